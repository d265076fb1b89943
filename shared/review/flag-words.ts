/**
 * A raised flag in one plain sentence that states the measured value and the limit once: "The footage is dark:
 * the median mean luma (0–255) is 31.7, under the limit of 40." The worker stores it on the clip and the screens
 * show it as it is, without repeating the numbers beside it.
 */

export interface FlagNumbers {
  measure: string;
  value: number;
  threshold: number;
}

/** Measures that are shares (0–1) read better as percentages; recognised by their words. */
const SHARE_MEASURE = /\bshare\b/;
const DECIMALS = 3;

/** A measured number as a curator reads it: shares in per cent, the rest with at most three decimals. */
export function flagNumber(measure: string, value: number): string {
  if (SHARE_MEASURE.test(measure)) return `${Number((value * 100).toFixed(1))} %`;
  return Number(value.toFixed(DECIMALS)).toString();
}

/** "under" when the flag is raised below its limit, "over" when above: read off the numbers themselves. */
export function flagSentence(lead: string, { measure, value, threshold }: FlagNumbers): string {
  const side = value < threshold ? 'under' : 'over';
  return (
    `${lead}: the ${measure} is ${flagNumber(measure, value)}, ${side} the limit of ` +
    `${flagNumber(measure, threshold)}.`
  );
}
