import { describe, expect, it } from 'vitest';
import { flagNumber, flagSentence } from '../../../shared/review/flag-words';

describe('flag sentences', () => {
  it('state the value and the limit once, on the side the flag was raised', () => {
    expect(
      flagSentence('The camera shakes', {
        measure: 'median jitter of the global motion (px per frame step)',
        value: 2.1284,
        threshold: 2,
      }),
    ).toBe(
      'The camera shakes: the median jitter of the global motion (px per frame step) is 2.128, over the limit ' +
        'of 2.',
    );
    expect(
      flagSentence('The footage is dark', { measure: 'median mean luma (0–255)', value: 31.7, threshold: 40 }),
    ).toBe('The footage is dark: the median mean luma (0–255) is 31.7, under the limit of 40.');
  });

  it('give shares in per cent and other measures with at most three decimals', () => {
    expect(flagNumber('median share of blown highlights', 0.1234)).toBe('12.3 %');
    expect(flagNumber('share of frames near-identical to another clip', 1)).toBe('100 %');
    expect(flagNumber('cuts per minute', 6.66666)).toBe('6.667');
  });
});
