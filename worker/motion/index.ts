// Kinefold's motion estimators by name: the project setting chooses one, and every field records the estimator
// and the full parameters it was computed with (defaults merged with the project's overrides).

import { DIS_DEFAULTS, estimateDis, validateDisParams, type DisParams } from './dis/dis.js';
import {
  FARNEBACK_DEFAULTS,
  estimateFarneback,
  validateFarnebackParams,
  type FarnebackParams,
} from './farneback/farneback.js';
import {
  HORN_SCHUNCK_DEFAULTS,
  estimateHornSchunck,
  validateHornSchunckParams,
  type HornSchunckParams,
} from './horn-schunck/horn-schunck.js';
import {
  LUCAS_KANADE_DEFAULTS,
  estimateLucasKanade,
  validateLucasKanadeParams,
  type LucasKanadeParams,
} from './lucas-kanade/lucas-kanade.js';
import type { MotionWorkspace } from './kernels/workspace.js';
import type { EstimatorName } from '../../shared/estimators';

export interface EstimatorParams {
  farneback: FarnebackParams;
  'horn-schunck': HornSchunckParams;
  'lucas-kanade': LucasKanadeParams;
  dis: DisParams;
}

export type EstimateFunction<P> = (
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  params: P,
  workspace?: MotionWorkspace,
  out?: Float32Array,
) => Float32Array;

export interface EstimatorEntry<P> {
  defaults: Readonly<P>;
  validate: (params: P) => void;
  estimate: EstimateFunction<P>;
}

/** Each estimator's defaults, parameter check and function, by name. */
export const ESTIMATOR_REGISTRY: { readonly [K in EstimatorName]: EstimatorEntry<EstimatorParams[K]> } = {
  farneback: {
    defaults: FARNEBACK_DEFAULTS,
    validate: validateFarnebackParams,
    estimate: estimateFarneback,
  },
  'horn-schunck': {
    defaults: HORN_SCHUNCK_DEFAULTS,
    validate: validateHornSchunckParams,
    estimate: estimateHornSchunck,
  },
  'lucas-kanade': {
    defaults: LUCAS_KANADE_DEFAULTS,
    validate: validateLucasKanadeParams,
    estimate: estimateLucasKanade,
  },
  dis: {
    defaults: DIS_DEFAULTS,
    validate: validateDisParams,
    estimate: estimateDis,
  },
};

export function isEstimator(name: string): name is EstimatorName {
  return Object.hasOwn(ESTIMATOR_REGISTRY, name);
}

/**
 * The complete parameters for `name`: its defaults with `overrides` applied, validated. Unknown keys are
 * refused so that a typo in a project setting does not silently fall back to a default.
 */
export function resolveParams<K extends EstimatorName>(
  name: K,
  overrides: Partial<EstimatorParams[K]> = {},
): EstimatorParams[K] {
  const entry = ESTIMATOR_REGISTRY[name] as EstimatorEntry<EstimatorParams[K]>;
  for (const key of Object.keys(overrides)) {
    if (!Object.hasOwn(entry.defaults, key)) throw new Error(`${name}: unknown parameter "${key}"`);
  }
  const params = { ...entry.defaults, ...overrides } as EstimatorParams[K];
  entry.validate(params);
  return params;
}

export interface EstimatedField<K extends EstimatorName> {
  estimator: K;
  /** The parameters used, to be recorded with the field. */
  params: EstimatorParams[K];
  /** Interleaved (u, v), width × height. */
  flow: Float32Array;
}

/** Runs the named estimator with resolved parameters and returns the field with what produced it. */
export function estimateMotion<K extends EstimatorName>(
  name: K,
  prev: Float32Array,
  next: Float32Array,
  width: number,
  height: number,
  overrides: Partial<EstimatorParams[K]> = {},
  workspace?: MotionWorkspace,
  out?: Float32Array,
): EstimatedField<K> {
  const params = resolveParams(name, overrides);
  const entry = ESTIMATOR_REGISTRY[name] as EstimatorEntry<EstimatorParams[K]>;
  const flow = entry.estimate(prev, next, width, height, params, workspace, out);
  return { estimator: name, params, flow };
}
