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
import type { Role } from '../../../shared/roles';
import type { Team } from './team';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<string>;
  /** Always lower-case (the table checks it). */
  declare email: string;
  declare name: string;
  /** Argon2id PHC string; null for an invited user who has not accepted yet. */
  declare passwordHash: string | null;
  declare roles: Role[];
  declare teamId: ForeignKey<Team['id']> | null;
  declare disabled: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare lastSignInAt: Date | null;

  declare team?: NonAttribute<Team | null>;

  static initModel(sequelize: Sequelize): void {
    User.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        email: {
          type: DataTypes.TEXT,
          allowNull: false,
          unique: true,
          set(value: string) {
            this.setDataValue('email', value.trim().toLowerCase());
          },
        },
        name: { type: DataTypes.TEXT, allowNull: false },
        passwordHash: { type: DataTypes.TEXT, allowNull: true },
        roles: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        disabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
        lastSignInAt: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, tableName: 'users' },
    );
  }
}

/** Rows of lucia's session table. Lucia reads and writes them; the model is for queries such as "sessions of a user". */
export class UserSession extends Model<InferAttributes<UserSession>, InferCreationAttributes<UserSession>> {
  declare id: string;
  declare userId: ForeignKey<User['id']>;
  declare expiresAt: Date;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    UserSession.init(
      {
        id: { type: DataTypes.TEXT, primaryKey: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'user_sessions', updatedAt: false },
    );
  }
}
