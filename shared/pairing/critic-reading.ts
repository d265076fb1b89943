/**
 * The plain-language reading of a view pair's trained-critic report: what its held-out bound means and what it
 * does not. It reads the largest K that the held-out pairs fill, where the bound has the most room below log K.
 * Thresholds: a bound at or above 90 % of log K reads as trivial (as pair-difficulty.ts reads it); at or below
 * 5 % of log K as nothing found, which is about the spread of the bound on a few dozen held-out pairs from one
 * clip (measured on the demo footage, not a published figure).
 */

import type { CriticKResult, CriticReading } from '../types/pair-critic';
import { TRIVIAL_BOUND_SHARE } from './pair-difficulty';

export const NOTHING_FOUND_SHARE = 0.05;

export interface CriticReadingInput {
  results: readonly CriticKResult[];
  trained: boolean;
  trainPairs: number;
  trainClips: number;
  heldOutPairs: number;
  smallestK: number;
}

/** Two decimals; a figure that rounds to zero is written 0.00, not −0.00. */
const nats = (value: number) => `${(Math.abs(value) < 0.005 ? 0 : value).toFixed(2)} nats`;

export function readCritic(input: CriticReadingInput): { reading: CriticReading; message: string } {
  if (!input.trained) {
    return {
      reading: 'too-few',
      message: `The train split gives ${input.trainPairs} pairs of this view pair, too few to train a critic.`,
    };
  }
  const measured = input.results.filter((result) => result.heldOut !== null);
  const last = measured[measured.length - 1];
  if (!last || !last.heldOut) {
    return {
      reading: 'no-held-out',
      message:
        `The val split gives ${input.heldOutPairs} pairs of this view pair, fewer than a batch of ` +
        `${input.smallestK}: there is no held-out figure. Give the definition a larger val share to get one.`,
    };
  }
  const { bound, logK, k } = last.heldOut;
  const share = bound / logK;
  const floorNote =
    last.floor && last.floor.bound > bound
      ? ` The untrained embedding does better on these pairs (${nats(last.floor.bound)}): the critic learned ` +
        'particulars of the training clips; both figures are lower bounds, so the larger one holds.'
      : '';
  const source = `${input.trainPairs} training pairs from ${input.trainClips} clip${input.trainClips === 1 ? '' : 's'}`;
  if (share >= TRIVIAL_BOUND_SHARE) {
    return {
      reading: 'trivial',
      message:
        `On held-out clips the critic picks the partner out of ${k} candidates almost every time ` +
        `(${nats(bound)} of log K = ${nats(logK)}). The views match trivially: such pairs teach a model little ` +
        `that a small linear critic does not already see. The bound is capped by log K, so the views may share ` +
        `more than it shows.${floorNote}`,
    };
  }
  if (share <= NOTHING_FOUND_SHARE) {
    return {
      reading: 'nothing-found',
      message:
        `On held-out clips the trained critic does no better than chance (${nats(bound)} at K = ${k}). ` +
        `It found nothing shared that carries over to new clips, with ${source}. That does not show the views ` +
        `are unrelated: a larger model, other descriptors or more clips may find what this critic cannot.` +
        floorNote,
    };
  }
  return {
    reading: 'shared',
    message:
      `On held-out clips the views share at least ${nats(bound)} (of log K = ${nats(logK)} at K = ${k}) ` +
      `that a small critic trained on ${source} finds. It is a lower bound on their mutual information, not an ` +
      'estimate of it, and it says nothing about whether what they share is what a model should learn.' +
      floorNote,
  };
}
