import type { EstimatorName } from '../estimators';

/** A project as the API shows it: its settings and the bytes its clips use. */
export interface ProjectSummary {
  id: number;
  name: string;
  description: string;
  archived: boolean;
  quotaBytes: number | null;
  /** Days after a reject verdict when the clip's files are purged; null keeps rejected footage. */
  retentionDays: number | null;
  /** Everything the project's clips hold: their sources and what processing derived from them (or, until then,
   * the derived bytes predicted at admission). */
  usedBytes: number;
  /** The uploaded footage alone, within usedBytes. */
  sourceBytes: number;
  clipCount: number;
  settings: ProjectSettings;
  createdAt: string;
  updatedAt: string;
}

export interface ProjectSettings {
  sampleFps: number;
  workingSize: number;
  deltas: number[];
  estimator: EstimatorName;
  estimatorParams: Record<string, number | string | boolean>;
  flagThresholds: Record<string, number>;
}
