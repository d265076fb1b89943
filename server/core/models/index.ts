import type { Sequelize } from 'sequelize';
import { ApiToken } from './api-token.model';
import { AuditEvent } from './audit-event.model';
import { Clip } from './clip.model';
import { ClipCluster } from './clip-cluster.model';
import { Clustering } from './clustering.model';
import { CutMark } from './cut-mark.model';
import { Frame } from './frame.model';
import { Invitation } from './invitation.model';
import { Job } from './job.model';
import { MailMessage } from './mail-message.model';
import { MailOutbox } from './mail-outbox.model';
import { MomentDescriptor } from './moment-descriptor.model';
import { MotionField } from './motion-field.model';
import { Pairset } from './pairset.model';
import { PasswordReset } from './password-reset.model';
import { Project } from './project.model';
import { QuotaWarning } from './quota-warning.model';
import { RejectionDigest } from './rejection-digest.model';
import { Session } from './session.model';
import { Setting } from './setting.model';
import { Shard } from './shard.model';
import { UploadReservation } from './upload-reservation.model';
import { UsageSnapshot } from './usage-snapshot.model';
import { User } from './user.model';
import { Verdict } from './verdict.model';
import { WorkerPresence } from './worker-presence.model';

/** Binds every model to the open database and declares the associations, in one place. */
export function initModels(sequelize: Sequelize): void {
  User.initModel(sequelize);
  Project.initModel(sequelize);
  AuditEvent.initModel(sequelize);
  Session.initModel(sequelize);
  Clip.initModel(sequelize);
  Job.initModel(sequelize);
  WorkerPresence.initModel(sequelize);
  Frame.initModel(sequelize);
  MotionField.initModel(sequelize);
  UploadReservation.initModel(sequelize);
  Invitation.initModel(sequelize);
  PasswordReset.initModel(sequelize);
  MailOutbox.initModel(sequelize);
  MailMessage.initModel(sequelize);
  UsageSnapshot.initModel(sequelize);
  QuotaWarning.initModel(sequelize);
  Verdict.initModel(sequelize);
  RejectionDigest.initModel(sequelize);
  Setting.initModel(sequelize);
  Pairset.initModel(sequelize);
  Shard.initModel(sequelize);
  ApiToken.initModel(sequelize);
  CutMark.initModel(sequelize);
  MomentDescriptor.initModel(sequelize);
  Clustering.initModel(sequelize);
  ClipCluster.initModel(sequelize);

  AuditEvent.belongsTo(User, { as: 'actor', foreignKey: 'actorId', constraints: false });
  Clip.belongsTo(Project, { as: 'project', foreignKey: 'projectId' });
  Clip.belongsTo(User, { as: 'uploader', foreignKey: 'uploaderId' });
  Project.hasMany(Clip, { as: 'clips', foreignKey: 'projectId' });
  Job.belongsTo(Clip, { as: 'clip', foreignKey: 'clipId', constraints: false });
  Clip.hasMany(Frame, { as: 'frames', foreignKey: 'clipId', constraints: false });
  Clip.hasMany(MotionField, { as: 'motionFields', foreignKey: 'clipId', constraints: false });
  CutMark.belongsTo(User, { as: 'markedBy', foreignKey: 'userId', constraints: false });
  Invitation.belongsTo(User, { as: 'invitedBy', foreignKey: 'invitedById', constraints: false });
  Clip.belongsTo(User, { as: 'claimHolder', foreignKey: 'claimedBy', constraints: false });
  // The verdict in force; the whole history is Verdict rows of the clip, superseded ones included.
  Clip.hasOne(Verdict, { as: 'verdict', foreignKey: 'clipId', scope: { supersededAt: null }, constraints: false });
  Verdict.belongsTo(User, { as: 'curator', foreignKey: 'curatorId', constraints: false });
  Verdict.belongsTo(Clip, { as: 'clip', foreignKey: 'clipId', constraints: false });
  Pairset.belongsTo(User, { as: 'owner', foreignKey: 'ownerId', constraints: false });
  Pairset.hasMany(Shard, { as: 'shards', foreignKey: 'pairsetId', constraints: false });
  ApiToken.belongsTo(User, { as: 'user', foreignKey: 'userId', constraints: false });
}

export {
  ApiToken,
  AuditEvent,
  Clip,
  ClipCluster,
  Clustering,
  CutMark,
  Frame,
  Invitation,
  Job,
  MailMessage,
  MailOutbox,
  MomentDescriptor,
  MotionField,
  Pairset,
  PasswordReset,
  Project,
  QuotaWarning,
  RejectionDigest,
  Session,
  Setting,
  Shard,
  UploadReservation,
  UsageSnapshot,
  User,
  Verdict,
  WorkerPresence,
};
