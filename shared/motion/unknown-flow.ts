// Unknown-flow convention of the Middlebury optical flow format.
// Source: D. Scharstein, Middlebury `flow-code` (flowIO.h: UNKNOWN_FLOW_THRESH 1e9, UNKNOWN_FLOW 1e10);
// Baker et al., "A Database and Evaluation Methodology for Optical Flow", IJCV 92(1), 2011.

/** The value writers store for a pixel whose motion is unknown. */
export const UNKNOWN_FLOW = 1e10;

/** A component above this magnitude marks the pixel unknown. */
export const UNKNOWN_FLOW_THRESHOLD = 1e9;

/** True when (u, v) is the unknown marker: a component beyond the threshold, or NaN. */
export function isUnknownFlow(u: number, v: number): boolean {
  // Written so that NaN fails the "known" comparison and counts as unknown.
  return !(Math.abs(u) <= UNKNOWN_FLOW_THRESHOLD && Math.abs(v) <= UNKNOWN_FLOW_THRESHOLD);
}
