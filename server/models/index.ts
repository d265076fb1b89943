import type { Sequelize } from 'sequelize';
import { AuditEvent } from './audit-event.model';
import { Project } from './project.model';
import { Session } from './session.model';
import { User } from './user.model';

/** Binds every model to the open database and declares the associations, in one place. */
export function initModels(sequelize: Sequelize): void {
  User.initModel(sequelize);
  Project.initModel(sequelize);
  AuditEvent.initModel(sequelize);
  Session.initModel(sequelize);

  AuditEvent.belongsTo(User, { as: 'actor', foreignKey: 'actorId', constraints: false });
}

export { AuditEvent, Project, Session, User };
