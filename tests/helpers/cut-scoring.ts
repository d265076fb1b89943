// Scoring detected transitions against known ones as shot-boundary evaluations do (the TRECVID shot boundary
// task's convention, from memory: a detected transition counts when it overlaps a reference transition, each
// matched at most once; hard cuts are allowed a few frames' slack, here one sampled frame either side).

export interface FrameSpan {
  /** The first frame with a cut before it. */
  first: number;
  /** The last such frame of a run of consecutive ones (= first for a hard cut). */
  last: number;
}

/** Runs of consecutive frames with a cut before them: one span per transition. */
export function detectedSpans(cutBefore: readonly boolean[]): FrameSpan[] {
  const spans: FrameSpan[] = [];
  cutBefore.forEach((cut, k) => {
    if (!cut) return;
    const open = spans.at(-1);
    if (open && open.last === k - 1) open.last = k;
    else spans.push({ first: k, last: k });
  });
  return spans;
}

export interface TransitionScore {
  matched: number;
  detected: number;
  reference: number;
}

export function scoreTransitions(
  detected: readonly FrameSpan[],
  reference: readonly FrameSpan[],
  tolerance = 1,
): TransitionScore {
  const used = new Set<number>();
  let matched = 0;
  for (const span of detected) {
    const r = reference.findIndex(
      (ref, i) => !used.has(i) && span.first - tolerance <= ref.last && ref.first <= span.last + tolerance,
    );
    if (r >= 0) {
      used.add(r);
      matched += 1;
    }
  }
  return { matched, detected: detected.length, reference: reference.length };
}
