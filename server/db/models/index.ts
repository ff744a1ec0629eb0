// Initialise every model on one Sequelize instance and wire their associations.
// A later model: add its file here, call its initModel, add its associations.

import type { Sequelize } from 'sequelize';
import { AuditEvent } from './audit-event';
import { Block } from './block';
import { MailMessage } from './mail-message';
import { Netlist, NetlistFile } from './netlist';
import { RuleDeck, RuleDeckVersion } from './rule-deck';
import { FindingRow, Run } from './run';
import { Team } from './team';
import { ApiToken, Invitation, PasswordResetToken } from './tokens';
import { User, UserSession } from './user';
import { Waiver } from './waiver';

export { AuditEvent, Block, MailMessage, Netlist, NetlistFile, RuleDeck, RuleDeckVersion, FindingRow, Run, Team };
export { ApiToken, Invitation, PasswordResetToken, User, UserSession, Waiver };

let initialisedOn: Sequelize | undefined;

export function initModels(sequelize: Sequelize): void {
  if (initialisedOn === sequelize) return;
  if (initialisedOn) throw new Error('models are already bound to another Sequelize instance in this process');
  initialisedOn = sequelize;

  for (const model of [Team, User, UserSession, PasswordResetToken, Invitation, ApiToken, Block, Netlist, NetlistFile, RuleDeck, RuleDeckVersion, Run, FindingRow, Waiver, AuditEvent, MailMessage]) {
    model.initModel(sequelize);
  }

  Team.hasMany(User, { foreignKey: 'teamId', as: 'users' });
  User.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  User.hasMany(UserSession, { foreignKey: 'userId', as: 'sessions' });
  UserSession.belongsTo(User, { foreignKey: 'userId', as: 'user' });

  PasswordResetToken.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Invitation.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Invitation.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  Invitation.belongsTo(User, { foreignKey: 'invitedBy', as: 'inviter' });
  ApiToken.belongsTo(User, { foreignKey: 'userId', as: 'user' });

  Team.hasMany(Block, { foreignKey: 'teamId', as: 'blocks' });
  Block.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  Block.belongsTo(User, { foreignKey: 'createdBy', as: 'creator' });

  Netlist.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  Netlist.belongsTo(Block, { foreignKey: 'blockId', as: 'block' });
  Netlist.belongsTo(User, { foreignKey: 'uploadedBy', as: 'uploader' });
  Netlist.hasMany(NetlistFile, { foreignKey: 'netlistId', as: 'files' });
  NetlistFile.belongsTo(Netlist, { foreignKey: 'netlistId', as: 'netlist' });

  RuleDeck.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  RuleDeck.hasMany(RuleDeckVersion, { foreignKey: 'deckId', as: 'versions' });
  RuleDeck.belongsTo(RuleDeckVersion, { foreignKey: 'defaultVersionId', as: 'defaultVersion', constraints: false });
  RuleDeckVersion.belongsTo(RuleDeck, { foreignKey: 'deckId', as: 'deck' });
  RuleDeckVersion.belongsTo(User, { foreignKey: 'createdBy', as: 'creator' });
  RuleDeckVersion.belongsTo(User, { foreignKey: 'publishedBy', as: 'publisher' });
  RuleDeckVersion.belongsTo(RuleDeckVersion, { foreignKey: 'parentVersionId', as: 'parent' });

  Run.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  Run.belongsTo(Block, { foreignKey: 'blockId', as: 'block' });
  Run.belongsTo(Netlist, { foreignKey: 'netlistId', as: 'netlist' });
  Run.belongsTo(RuleDeckVersion, { foreignKey: 'deckVersionId', as: 'deckVersion' });
  Run.belongsTo(User, { foreignKey: 'submittedBy', as: 'submitter' });
  Run.hasMany(FindingRow, { foreignKey: 'runId', as: 'findings' });
  FindingRow.belongsTo(Run, { foreignKey: 'runId', as: 'run' });

  Waiver.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  Waiver.belongsTo(Block, { foreignKey: 'blockId', as: 'block' });
  Waiver.belongsTo(User, { foreignKey: 'requestedBy', as: 'requester' });
  Waiver.belongsTo(User, { foreignKey: 'decidedBy', as: 'decider' });
  Waiver.belongsTo(User, { foreignKey: 'revokedBy', as: 'revoker' });

  AuditEvent.belongsTo(User, { foreignKey: 'actorId', as: 'actor' });
  AuditEvent.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
  MailMessage.belongsTo(Team, { foreignKey: 'teamId', as: 'team' });
}
