import type { Project } from '../../server/core/models';
import { resolveParams, type EstimatorParams } from '../motion/index';
import { type EstimatorName } from '../../shared/estimators';
import { checkedSettings } from './project-settings';

export interface MotionSettings {
  estimator: EstimatorName;
  /** The estimator's defaults with the project's overrides: what every field records. */
  params: EstimatorParams[EstimatorName];
}

/** The project's estimator and complete parameters (checked when saved; see checkedSettings). */
export function motionSettings(project: Project): MotionSettings {
  const { estimator, estimatorParams } = checkedSettings(project);
  return { estimator, params: resolveParams(estimator, estimatorParams as Partial<EstimatorParams[typeof estimator]>) };
}
