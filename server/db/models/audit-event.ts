import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type NonAttribute,
  type Sequelize,
} from 'sequelize';
import type { Team } from './team';
import type { User } from './user';

export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<number>;
  declare teamId: ForeignKey<Team['id']> | null;
  declare actorId: ForeignKey<User['id']> | null;
  /** Dotted verb: `auth.sign-in`, `block.create`, `user.update`, … */
  declare action: string;
  declare subjectType: string;
  declare subjectId: string | null;
  declare detail: CreationOptional<Record<string, unknown>>;
  declare createdAt: CreationOptional<Date>;

  declare actor?: NonAttribute<User | null>;

  static initModel(sequelize: Sequelize): void {
    AuditEvent.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        action: { type: DataTypes.TEXT, allowNull: false },
        subjectType: { type: DataTypes.TEXT, allowNull: false },
        subjectId: { type: DataTypes.TEXT, allowNull: true },
        detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'audit_events', updatedAt: false },
    );
  }
}
