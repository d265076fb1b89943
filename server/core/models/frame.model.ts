import {
  DataTypes,
  Model,
  QueryTypes,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { CutEvidence } from '../../../shared/types/cuts';
import type { ClipFrame, FrameMotion } from '../../../shared/types/frames';

/** A sampled still of a clip and its signals (DESIGN §2); written by the worker's sample and signals stages. */
/** Clips per batch of hashes read for the duplicate flag (well under SQLite's 999 bound parameters). */
const HASH_BATCH_CLIPS = 500;

export class Frame extends Model<InferAttributes<Frame>, InferCreationAttributes<Frame>> {
  declare id: CreationOptional<number>;
  declare clipId: number;
  declare index: number;
  declare timeS: number;
  declare meanLuma: CreationOptional<number | null>;
  declare contrast: CreationOptional<number | null>;
  declare sharpness: CreationOptional<number | null>;
  /** Share of crushed plus blown pixels. */
  declare clippedShare: CreationOptional<number | null>;
  declare clippedHighShare: CreationOptional<number | null>;
  declare cutBefore: CreationOptional<boolean>;
  /** 1 − correlation of this frame's grey histogram with the previous frame's; null for the first frame. */
  declare cutScore: CreationOptional<number | null>;
  /** What the cut detector measured against the previous frame and decided (shared/types/cuts.ts). */
  declare cutEvidence: CreationOptional<CutEvidence | null>;
  /** 64-bit difference hash as 16 hex digits, compared across the project's clips for the duplicate flag. */
  declare dhash: CreationOptional<string | null>;

  /** `motion`: the summary of the forward field from this frame to the next, where one exists. */
  toApi(motion: FrameMotion | null = null): ClipFrame {
    return {
      index: this.index,
      timeS: this.timeS,
      meanLuma: this.meanLuma,
      contrast: this.contrast,
      sharpness: this.sharpness,
      clippedShare: this.clippedShare,
      cutBefore: this.cutBefore,
      motion,
    };
  }

  /**
   * The stored frame hashes of the project's other clips, by clip in id order, for the duplicate flag: a batch of
   * clips at a time, so a project of many thousand clips never sits in memory whole.
   */
  static async *hashBatchesOfOtherClips(
    projectId: number,
    clipId: number,
    clipsPerBatch = HASH_BATCH_CLIPS,
  ): AsyncGenerator<{ clipId: number; hashes: string[] }[]> {
    for (let after = 0; ;) {
      const ids = (
        await Frame.sequelize!.query<{ id: number }>(
          `SELECT id FROM clips WHERE "projectId" = :projectId AND id <> :clipId AND id > :after ORDER BY id LIMIT :limit`,
          { replacements: { projectId, clipId, after, limit: clipsPerBatch }, type: QueryTypes.SELECT },
        )
      ).map((row) => row.id);
      if (ids.length === 0) return;
      const rows = await Frame.sequelize!.query<{ clipId: number; dhash: string }>(
        `SELECT "clipId", dhash FROM frames WHERE "clipId" IN (:ids) AND dhash IS NOT NULL ORDER BY "clipId", "index"`,
        { replacements: { ids }, type: QueryTypes.SELECT },
      );
      const byClip = new Map<number, string[]>();
      for (const row of rows) {
        const hashes = byClip.get(row.clipId) ?? [];
        hashes.push(row.dhash);
        byClip.set(row.clipId, hashes);
      }
      yield [...byClip].map(([id, hashes]) => ({ clipId: id, hashes }));
      after = ids.at(-1)!;
    }
  }

  static initModel(sequelize: Sequelize): void {
    Frame.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        clipId: { type: DataTypes.INTEGER, allowNull: false },
        index: { type: DataTypes.INTEGER, allowNull: false },
        timeS: { type: DataTypes.FLOAT, allowNull: false },
        meanLuma: { type: DataTypes.FLOAT, allowNull: true },
        contrast: { type: DataTypes.FLOAT, allowNull: true },
        sharpness: { type: DataTypes.FLOAT, allowNull: true },
        clippedShare: { type: DataTypes.FLOAT, allowNull: true },
        clippedHighShare: { type: DataTypes.FLOAT, allowNull: true },
        cutBefore: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        cutScore: { type: DataTypes.FLOAT, allowNull: true },
        dhash: { type: DataTypes.STRING(16), allowNull: true },
        cutEvidence: { type: DataTypes.JSON, allowNull: true },
      },
      { sequelize, tableName: 'frames', timestamps: false },
    );
  }
}
