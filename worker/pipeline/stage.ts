import type { Transaction } from 'sequelize';
import type { ClipStage } from '../../shared/pipeline-stages';
import type { Clip, Project } from '../../server/core/models';
import type { StoragePaths } from '../../server/core/storage/paths';
import type { FramePool } from '../pool/frame-pool';
import type { PipelineSettings } from './project-settings';
import type { WorkDir } from './work-dir';

/** What a stage of process-clip works with. The clip and project are reloaded before each stage. */
export interface StageContext {
  clip: Clip;
  project: Project;
  settings: PipelineSettings;
  paths: StoragePaths;
  pool: FramePool;
  signal: AbortSignal;
  /** Share of this stage done (0..1), written to the Job row now and then. */
  progress(share: number): void;
  /** A work folder for this attempt at the stage; removed when the stage ends, however it ends. */
  workDir(): Promise<WorkDir>;
  /**
   * Writes the stage's rows once its files are in place, and moves the job on to the next stage, in one short
   * IMMEDIATE transaction. Nothing is written when the lease was lost meanwhile.
   */
  commit(write?: (transaction: Transaction) => Promise<void>): Promise<void>;
}

/**
 * One stage of processing a clip. Running it again after a crash gives the same result: outputs are replaced,
 * never added to, and rows are rewritten for the whole clip.
 */
export interface PipelineStage {
  name: ClipStage;
  run(context: StageContext): Promise<void>;
}
