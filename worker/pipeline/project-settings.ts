import { DEFAULT_FLAG_THRESHOLDS, type FlagThresholds } from '../../shared/flag-thresholds';
import type { Project } from '../../server/core/models';
import { FinalJobError } from '../jobs/job-errors';
import { DEFAULT_CUT_BINS, DEFAULT_CUT_THRESHOLD } from '../signals/cuts';

/** The project settings the pipeline reads, with defaults filled in. */
export interface PipelineSettings {
  sampleFps: number;
  workingSize: number;
  cutBins: number;
  /** Cut before a frame when 1 − correlation of grey histograms ≥ this (cuts.ts); the `cutThreshold` setting. */
  cutThreshold: number;
  flagThresholds: FlagThresholds;
}

/** Project settings are stored with the flag thresholds; the cut threshold sits among them as `cutThreshold`. */
export const CUT_THRESHOLD_SETTING = 'cutThreshold';
const MAX_CUT_SCORE = 2;

export function pipelineSettings(project: Project): PipelineSettings {
  const { [CUT_THRESHOLD_SETTING]: cutThreshold = DEFAULT_CUT_THRESHOLD, ...flagOverrides } = project.flagThresholds;
  if (!(cutThreshold > 0 && cutThreshold <= MAX_CUT_SCORE)) {
    throw new FinalJobError(`The project's cut threshold is ${cutThreshold}; it must be more than 0 and at most `
      + `${MAX_CUT_SCORE}. An admin can change it in the project settings and process the clip again.`);
  }
  return {
    sampleFps: project.sampleFps,
    workingSize: project.workingSize,
    cutBins: DEFAULT_CUT_BINS,
    cutThreshold,
    flagThresholds: { ...DEFAULT_FLAG_THRESHOLDS, ...flagOverrides },
  };
}
