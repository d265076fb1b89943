import type { MotionScale } from '../../../shared/motion/motion-scale';

const plural = (count: number, one: string, many: string) => `${count} ${count === 1 ? one : many}`;

/** Which scale the clip's motion pictures use, and what was left out of it, in a curator's words. */
export function motionScaleWords(scale: MotionScale): string {
  const figure = scale.consistentOnly
    ? 'the 95th percentile of its consistent vectors'
    : 'the 95th percentile of its vectors (fields measured before consistent vectors were counted apart)';
  const leftOut = [
    scale.acrossCut > 0 ? plural(scale.acrossCut, 'pair across a cut', 'pairs across a cut') : '',
    scale.inconsistent > 0 ? plural(scale.inconsistent, 'mostly inconsistent field', 'mostly inconsistent fields') : '',
    scale.outliers > 0
      ? plural(scale.outliers, 'field far faster than the rest', 'fields far faster than the rest')
      : '',
  ].filter(Boolean);
  return (
    `Full colour is ${scale.pxPerStep.toFixed(1)} px per frame step: the fastest of ${plural(
      scale.fieldCount,
      'field',
      'fields',
    )} by ${figure}` +
    `${leftOut.length > 0 ? `, leaving out ${leftOut.join(', ')}` : ''}. Faster motion is drawn darker.`
  );
}
