import { DEFAULT_FLAG_THRESHOLDS, type FlagThresholds } from '../../shared/flag-thresholds';
import type { ProjectSettings } from '../../shared/schemas/project-settings';
import type { Project } from '../../server/core/models';
import { readProjectSettings } from '../../server/core/projects/project-settings';
import { FinalJobError } from '../jobs/job-errors';
import { DEFAULT_CUT_BINS, DEFAULT_CUT_THRESHOLD } from '../signals/cuts';

/** The project settings the pipeline reads, with defaults filled in. */
export interface PipelineSettings {
  sampleFps: number;
  workingSize: number;
  cutBins: number;
  /** The histogram evidence of a cut fires when 1 − correlation of grey histograms ≥ this (cuts.ts,
   * cut-decision.ts); the `cutThreshold` setting. */
  cutThreshold: number;
  flagThresholds: FlagThresholds;
}

const FIX = 'An admin can change it in the project settings and process the clip again.';

/**
 * The project's settings checked by the schema every save passes (shared/schemas/project-settings.ts); only a row
 * written before those checks can fail here, and it fails the job for good, saying what to change.
 */
export function checkedSettings(project: Project): ProjectSettings {
  const read = readProjectSettings(project);
  if ('problem' in read) throw new FinalJobError(`The project's setting ${read.problem}. ${FIX}`);
  return read.settings;
}

export function pipelineSettings(project: Project): PipelineSettings {
  const { sampleFps, workingSize, flagThresholds } = checkedSettings(project);
  const { cutThreshold = DEFAULT_CUT_THRESHOLD, ...flagOverrides } = flagThresholds;
  return {
    sampleFps,
    workingSize,
    cutBins: DEFAULT_CUT_BINS,
    cutThreshold,
    flagThresholds: { ...DEFAULT_FLAG_THRESHOLDS, ...flagOverrides },
  };
}
