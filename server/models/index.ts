import type { Sequelize } from 'sequelize';
import { AuditEvent } from './audit-event.model';
import { Clip } from './clip.model';
import { Frame } from './frame.model';
import { Invitation } from './invitation.model';
import { Job } from './job.model';
import { MailMessage } from './mail-message.model';
import { MailOutbox } from './mail-outbox.model';
import { PasswordReset } from './password-reset.model';
import { Project } from './project.model';
import { Session } from './session.model';
import { UploadReservation } from './upload-reservation.model';
import { User } from './user.model';

/** Binds every model to the open database and declares the associations, in one place. */
export function initModels(sequelize: Sequelize): void {
  User.initModel(sequelize);
  Project.initModel(sequelize);
  AuditEvent.initModel(sequelize);
  Session.initModel(sequelize);
  Clip.initModel(sequelize);
  Job.initModel(sequelize);
  Frame.initModel(sequelize);
  UploadReservation.initModel(sequelize);
  Invitation.initModel(sequelize);
  PasswordReset.initModel(sequelize);
  MailOutbox.initModel(sequelize);
  MailMessage.initModel(sequelize);

  AuditEvent.belongsTo(User, { as: 'actor', foreignKey: 'actorId', constraints: false });
  Clip.belongsTo(Project, { as: 'project', foreignKey: 'projectId' });
  Clip.belongsTo(User, { as: 'uploader', foreignKey: 'uploaderId' });
  Project.hasMany(Clip, { as: 'clips', foreignKey: 'projectId' });
  Job.belongsTo(Clip, { as: 'clip', foreignKey: 'clipId', constraints: false });
  Clip.hasMany(Frame, { as: 'frames', foreignKey: 'clipId', constraints: false });
  Invitation.belongsTo(User, { as: 'invitedBy', foreignKey: 'invitedById', constraints: false });
}

export {
  AuditEvent, Clip, Frame, Invitation, Job, MailMessage, MailOutbox, PasswordReset, Project, Session, UploadReservation,
  User,
};
