/**
 * The motion (px per frame step) that a clip's colour pictures show at full colour. flow-code's color_flow.cpp
 * divides by the largest radius of one field; one scale for the whole clip makes its pictures comparable, and it
 * must come from the motion the camera really saw, so three things are left out before it is taken:
 * - fields into a frame with a cut before it (a cut known from the frames table, detected or marked by hand): the
 *   "motion" across a cut is two unrelated pictures matched by force;
 * - inconsistent vectors: each field's figure is the nearest-rank 95th percentile of the magnitudes of the
 *   vectors that pass the forward–backward check (consistentP95Magnitude), falling back to the 95th percentile of
 *   all vectors for fields stored before that figure existed; a field where fewer than MIN_CONSISTENT_SHARE of
 *   the pixels pass is left out whole, since its few passing vectors agree by chance;
 * - outlying fields: of what remains, the scale is the largest figure at or under Tukey's outer fence
 *   Q3 + 3·IQR (Tukey, Exploratory Data Analysis, 1977: beyond it lie "far out" values), with Q1 and Q3 the
 *   nearest-rank quartiles of the figures.
 * Faster motion is drawn dimmed, as flow-code does beyond radius 1. Null when no field is left; the picture code
 * treats 0 as "use the field's own maximum".
 */

/** Below this share of consistent pixels a field says nothing reliable about the clip's speed (common practice). */
export const MIN_CONSISTENT_SHARE = 0.5;
/** Tukey's outer fence: Q3 + 3·IQR. */
const FAR_OUT_IQR = 3;

export interface ScaledField {
  /** The field runs from frame fromIndex to fromIndex + 1. */
  fromIndex: number;
  p95Magnitude: number;
  /** Null for fields stored before the figure existed. */
  consistentP95Magnitude?: number | null;
  consistentShare: number;
}

/** The scale and what it was taken from, so a page can say which scale its pictures use. */
export interface MotionScale {
  pxPerStep: number;
  /** Fields the scale was taken from. */
  fieldCount: number;
  /** Left out: fields into a frame after a cut, mostly inconsistent fields, far-out fields. */
  acrossCut: number;
  inconsistent: number;
  outliers: number;
  /** True when every field used had its consistent 95th percentile; false when older figures stood in. */
  consistentOnly: boolean;
}

/** `cutBefore`: indexes of frames with a cut before them. */
export function clipMotionScale(fields: readonly ScaledField[], cutBefore: ReadonlySet<number>): MotionScale | null {
  const acrossCut = fields.filter((field) => cutBefore.has(field.fromIndex + 1));
  const sameScene = fields.filter((field) => !cutBefore.has(field.fromIndex + 1));
  const reliable = sameScene.filter((field) => field.consistentShare >= MIN_CONSISTENT_SHARE);
  if (reliable.length === 0) return null;
  const figures = reliable.map(fieldFigure).sort((a, b) => a - b);
  const q1 = nearestRank(figures, 0.25);
  const q3 = nearestRank(figures, 0.75);
  const fence = q3 + FAR_OUT_IQR * (q3 - q1);
  const kept = figures.filter((figure) => figure <= fence);
  return {
    pxPerStep: kept[kept.length - 1]!,
    fieldCount: kept.length,
    acrossCut: acrossCut.length,
    inconsistent: sameScene.length - reliable.length,
    outliers: figures.length - kept.length,
    consistentOnly: reliable.every((field) => typeof field.consistentP95Magnitude === 'number'),
  };
}

function fieldFigure(field: ScaledField): number {
  return field.consistentP95Magnitude ?? field.p95Magnitude;
}

/** The ⌈p·N⌉-th smallest of sorted values (nearest rank, as the field statistics take percentiles). */
function nearestRank(sorted: readonly number[], p: number): number {
  return sorted[Math.min(sorted.length, Math.max(1, Math.ceil(p * sorted.length))) - 1]!;
}
