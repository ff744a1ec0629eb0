import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Block } from './block';
import type { Team } from './team';
import type { User } from './user';

export type WaiverState = 'requested' | 'approved' | 'rejected' | 'revoked';

export class Waiver extends Model<InferAttributes<Waiver>, InferCreationAttributes<Waiver>> {
  declare id: CreationOptional<string>;
  declare teamId: ForeignKey<Team['id']>;
  declare blockId: ForeignKey<Block['id']> | null;
  declare ruleId: string;
  declare cell: string | null;
  declare fingerprint: string | null;
  /** What the waiver covers; its values are defined by the waiver service. */
  declare scope: string;
  declare justification: string;
  declare state: CreationOptional<WaiverState>;
  declare requestedBy: ForeignKey<User['id']> | null;
  declare decidedBy: ForeignKey<User['id']> | null;
  declare decisionComment: string | null;
  declare decidedAt: Date | null;
  declare expiresAt: Date | null;
  declare bound: Record<string, unknown> | null;
  declare sourceRunId: CreationOptional<string | null>;
  declare sourceFindingId: CreationOptional<number | null>;
  declare severity: CreationOptional<string | null>;
  declare message: CreationOptional<string>;
  /** The finding's devices and nets when the waiver was asked for (the reason shown when a changed circuit lapses it). */
  declare devices: CreationOptional<string[]>;
  declare nets: CreationOptional<string[]>;
  declare measured: CreationOptional<Record<string, unknown> | null>;
  declare revokedBy: CreationOptional<ForeignKey<User['id']> | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare revokeReason: CreationOptional<string | null>;
  declare expiryWarnedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Waiver.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        ruleId: { type: DataTypes.TEXT, allowNull: false },
        cell: { type: DataTypes.TEXT, allowNull: true },
        fingerprint: { type: DataTypes.TEXT, allowNull: true },
        scope: { type: DataTypes.TEXT, allowNull: false },
        justification: { type: DataTypes.TEXT, allowNull: false },
        state: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'requested' },
        decisionComment: { type: DataTypes.TEXT, allowNull: true },
        decidedAt: { type: DataTypes.DATE, allowNull: true },
        expiresAt: { type: DataTypes.DATE, allowNull: true },
        bound: { type: DataTypes.JSONB, allowNull: true },
        sourceRunId: { type: DataTypes.UUID, allowNull: true },
        sourceFindingId: { type: DataTypes.BIGINT, allowNull: true },
        severity: { type: DataTypes.TEXT, allowNull: true },
        message: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        devices: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        nets: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        measured: { type: DataTypes.JSONB, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        revokeReason: { type: DataTypes.TEXT, allowNull: true },
        expiryWarnedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'waivers' },
    );
  }
}
