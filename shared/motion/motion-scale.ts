/**
 * The motion (px per frame step) that a clip's colour pictures show at full colour: the largest 95th-percentile
 * magnitude among its forward fields. flow-code's color_flow.cpp divides by the largest radius of one field; one
 * scale for the whole clip makes its pictures comparable, and the 95th percentile keeps a few wild pixels (flat
 * areas, frame edges) from washing every picture out. Faster motion is drawn dimmed, as flow-code does beyond
 * radius 1. Null when the clip has no field; the picture code treats 0 as "use the field's own maximum".
 */
export function clipMotionScale(fields: readonly { p95Magnitude: number }[]): number | null {
  if (fields.length === 0) return null;
  return fields.reduce((max, field) => Math.max(max, field.p95Magnitude), 0);
}
