import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { ClipState } from '../../../shared/clip-states';
import type { DerivedFormat } from '../storage/paths';
import type { ClipFlagDetail, ClipProbe, ClipSummary } from '../../../shared/types/clips';
import type { Project } from './project.model';
import type { User } from './user.model';
import type { Verdict } from './verdict.model';

/** One uploaded video file and everything derived from it (DESIGN §2). */
export class Clip extends Model<InferAttributes<Clip>, InferCreationAttributes<Clip>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare uploaderId: number;
  declare originalName: string;
  declare sizeBytes: number;
  /**
   * Bytes this clip holds against the quotas: the source plus everything derived from it, measured on disk; until
   * processing has measured them, the derived bytes predicted at admission.
   */
  declare storedBytes: number;
  /** Derived bytes predicted from the probe at admission (usage/derived-bytes.ts), kept to judge the prediction. */
  declare predictedDerivedBytes: CreationOptional<number | null>;
  /** How the derived files are stored (storage/paths.ts). */
  declare derivedFormat: CreationOptional<DerivedFormat>;
  declare sha256: string;
  declare sourceExt: string;
  declare state: ClipState;
  declare stage: CreationOptional<string | null>;
  declare error: CreationOptional<string | null>;
  declare container: string;
  declare codec: string;
  declare durationS: number;
  declare fps: number;
  declare width: number;
  declare height: number;
  declare rotation: number;
  declare site: string;
  declare rig: string;
  declare capturedAt: Date | null;
  declare tags: string[];
  declare notes: string;
  declare flags: CreationOptional<string[]>;
  declare claimedBy: CreationOptional<number | null>;
  declare claimExpiresAt: CreationOptional<Date | null>;
  declare purgedAt: CreationOptional<Date | null>;
  declare frameCount: CreationOptional<number | null>;
  declare cutCount: CreationOptional<number | null>;
  declare flagDetails: CreationOptional<ClipFlagDetail[]>;
  declare medianSharpness: CreationOptional<number | null>;
  declare meanLuma: CreationOptional<number | null>;
  /** Review signals the flags stage writes (shared/review/clip-signals.ts). */
  declare meanMotion: CreationOptional<number | null>;
  declare consistentShare: CreationOptional<number | null>;
  declare usablePairs: CreationOptional<number | null>;
  /** Set by the sample stage once preview.mp4 and the thumbnail are in place. */
  declare hasPreview: CreationOptional<boolean>;
  declare hasThumbnail: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare project?: NonAttribute<Project>;
  declare uploader?: NonAttribute<User>;
  /** The verdict in force, when loaded with the `verdict` include. */
  declare verdict?: NonAttribute<Verdict | null>;

  probe(): ClipProbe {
    return {
      container: this.container,
      codec: this.codec,
      durationS: this.durationS,
      fps: this.fps,
      width: this.width,
      height: this.height,
      rotation: this.rotation,
    };
  }

  toApi(): ClipSummary {
    return {
      id: this.id,
      projectId: this.projectId,
      projectName: this.project?.name ?? '',
      uploaderId: this.uploaderId,
      uploaderName: this.uploader?.name ?? '',
      originalName: this.originalName,
      sizeBytes: Number(this.sizeBytes),
      storedBytes: Number(this.storedBytes),
      sha256: this.sha256,
      state: this.state,
      stage: this.stage,
      error: this.error,
      flags: this.flags,
      probe: this.probe(),
      hasThumbnail: this.hasThumbnail,
      site: this.site,
      rig: this.rig,
      capturedAt: this.capturedAt?.toISOString() ?? null,
      tags: this.tags,
      notes: this.notes,
      purgedAt: this.purgedAt?.toISOString() ?? null,
      createdAt: this.createdAt.toISOString(),
      updatedAt: this.updatedAt.toISOString(),
      hasPreview: this.hasPreview,
      frameCount: this.frameCount,
      cutCount: this.cutCount,
      medianSharpness: this.medianSharpness,
      meanLuma: this.meanLuma,
      flagDetails: this.flagDetails,
      meanMotion: this.meanMotion,
      consistentShare: this.consistentShare,
      usablePairs: this.usablePairs,
      verdict: this.verdict?.toApi() ?? null,
    };
  }

  static initModel(sequelize: Sequelize): void {
    Clip.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        projectId: { type: DataTypes.INTEGER, allowNull: false },
        uploaderId: { type: DataTypes.INTEGER, allowNull: false },
        originalName: { type: DataTypes.STRING(400), allowNull: false },
        sizeBytes: { type: DataTypes.BIGINT, allowNull: false },
        storedBytes: { type: DataTypes.BIGINT, allowNull: false },
        predictedDerivedBytes: { type: DataTypes.BIGINT, allowNull: true },
        derivedFormat: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'packed' },
        sha256: { type: DataTypes.STRING(64), allowNull: false },
        sourceExt: { type: DataTypes.STRING(8), allowNull: false },
        state: { type: DataTypes.STRING(24), allowNull: false },
        stage: { type: DataTypes.STRING(24), allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        container: { type: DataTypes.STRING(64), allowNull: false },
        codec: { type: DataTypes.STRING(32), allowNull: false },
        durationS: { type: DataTypes.FLOAT, allowNull: false },
        fps: { type: DataTypes.FLOAT, allowNull: false },
        width: { type: DataTypes.INTEGER, allowNull: false },
        height: { type: DataTypes.INTEGER, allowNull: false },
        rotation: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        site: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
        rig: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
        capturedAt: { type: DataTypes.DATE, allowNull: true },
        tags: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        flags: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        claimedBy: { type: DataTypes.INTEGER, allowNull: true },
        claimExpiresAt: { type: DataTypes.DATE, allowNull: true },
        purgedAt: { type: DataTypes.DATE, allowNull: true },
        frameCount: { type: DataTypes.INTEGER, allowNull: true },
        cutCount: { type: DataTypes.INTEGER, allowNull: true },
        flagDetails: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        medianSharpness: { type: DataTypes.FLOAT, allowNull: true },
        meanLuma: { type: DataTypes.FLOAT, allowNull: true },
        meanMotion: { type: DataTypes.FLOAT, allowNull: true },
        consistentShare: { type: DataTypes.FLOAT, allowNull: true },
        usablePairs: { type: DataTypes.INTEGER, allowNull: true },
        hasPreview: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        hasThumbnail: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'clips' },
    );
  }
}
