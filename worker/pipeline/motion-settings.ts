import type { Project } from '../../server/core/models';
import { FinalJobError } from '../jobs/job-errors';
import {
  ESTIMATOR_NAMES, isEstimator, resolveParams, type Estimator, type EstimatorParams,
} from '../motion/index';

export interface MotionSettings {
  estimator: Estimator;
  /** The estimator's defaults with the project's overrides: what every field records. */
  params: EstimatorParams[Estimator];
}

const FIX = 'An admin can change it in the project settings and process the clip again.';

/** The project's estimator and complete parameters; settings that cannot work fail the job for good, saying why. */
export function motionSettings(project: Project): MotionSettings {
  const { estimator } = project;
  if (!isEstimator(estimator)) {
    const known = ESTIMATOR_NAMES.join(', ');
    throw new FinalJobError(`The project's motion estimator "${estimator}" is not one of ${known}. ${FIX}`);
  }
  try {
    const overrides = project.estimatorParams as Partial<EstimatorParams[typeof estimator]>;
    return { estimator, params: resolveParams(estimator, overrides) };
  } catch (error) {
    const reason = (error as Error).message;
    throw new FinalJobError(`The project's motion estimator parameters do not work: ${reason}. ${FIX}`);
  }
}
