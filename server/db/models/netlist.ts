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
import type { Block } from './block';
import type { Team } from './team';
import type { User } from './user';

/** One upload: the set of files a run reads. */
export class Netlist extends Model<InferAttributes<Netlist>, InferCreationAttributes<Netlist>> {
  declare id: CreationOptional<string>;
  declare teamId: ForeignKey<Team['id']>;
  declare blockId: ForeignKey<Block['id']>;
  declare uploadedBy: ForeignKey<User['id']> | null;
  declare fileCount: CreationOptional<number>;
  declare totalBytes: CreationOptional<number>;
  /** SHA-256 over the sorted (file hash, path) list; an identical re-upload to the block finds this row. */
  declare contentHash: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;

  declare files?: NonAttribute<NetlistFile[]>;

  static initModel(sequelize: Sequelize): void {
    Netlist.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        fileCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        totalBytes: { type: DataTypes.BIGINT, allowNull: false, defaultValue: 0 },
        contentHash: { type: DataTypes.TEXT, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'netlists', updatedAt: false },
    );
  }
}

export class NetlistFile extends Model<InferAttributes<NetlistFile>, InferCreationAttributes<NetlistFile>> {
  declare id: CreationOptional<string>;
  declare netlistId: ForeignKey<Netlist['id']>;
  /** Path inside the uploaded set, forward slashes. */
  declare path: string;
  /** Lower-case hex SHA-256 of `content`. */
  declare sha256: string;
  declare size: number;
  declare content: Buffer;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    NetlistFile.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        path: { type: DataTypes.TEXT, allowNull: false },
        sha256: { type: DataTypes.TEXT, allowNull: false },
        size: { type: DataTypes.BIGINT, allowNull: false },
        content: { type: DataTypes.BLOB, allowNull: false },
        createdAt: DataTypes.DATE,
      },
      {
        sequelize,
        tableName: 'netlist_files',
        updatedAt: false,
        // File contents can be large: load them only when asked for by name.
        defaultScope: { attributes: { exclude: ['content'] } },
      },
    );
  }
}
