import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Team } from './team';

export type MailStatus = 'queued' | 'sent' | 'failed';

/** The outbox: one row per outgoing message, written in the request and delivered in the background. */
export class MailMessage extends Model<InferAttributes<MailMessage>, InferCreationAttributes<MailMessage>> {
  declare id: CreationOptional<string>;
  /** The team the message concerns; admins see their own team's messages. */
  declare teamId: ForeignKey<Team['id']> | null;
  declare to: string;
  declare subject: string;
  declare text: string;
  declare html: string | null;
  declare status: CreationOptional<MailStatus>;
  declare error: string | null;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: CreationOptional<Date>;
  declare createdAt: CreationOptional<Date>;
  declare sentAt: Date | null;

  static initModel(sequelize: Sequelize): void {
    MailMessage.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        to: { type: DataTypes.TEXT, allowNull: false },
        subject: { type: DataTypes.TEXT, allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: false },
        html: { type: DataTypes.TEXT, allowNull: true },
        status: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'queued' },
        error: { type: DataTypes.TEXT, allowNull: true },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        nextAttemptAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        createdAt: DataTypes.DATE,
        sentAt: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, tableName: 'mail_messages', updatedAt: false },
    );
  }
}
