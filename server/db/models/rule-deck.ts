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
import type { Deck } from '../../../shared/deck';
import type { Team } from './team';
import type { User } from './user';

export class RuleDeck extends Model<InferAttributes<RuleDeck>, InferCreationAttributes<RuleDeck>> {
  declare id: CreationOptional<string>;
  declare teamId: ForeignKey<Team['id']>;
  declare name: string;
  declare description: CreationOptional<string>;
  /** The published version new runs use unless they name another. */
  declare defaultVersionId: string | null;
  /** The team's default deck (at most one per team): runs that name no version use its default version. */
  declare teamDefault: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare versions?: NonAttribute<RuleDeckVersion[]>;

  static initModel(sequelize: Sequelize): void {
    RuleDeck.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        name: { type: DataTypes.TEXT, allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        defaultVersionId: { type: DataTypes.UUID, allowNull: true },
        teamDefault: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'rule_decks' },
    );
  }
}

export type DeckVersionState = 'draft' | 'published';

export class RuleDeckVersion extends Model<InferAttributes<RuleDeckVersion>, InferCreationAttributes<RuleDeckVersion>> {
  declare id: CreationOptional<string>;
  declare deckId: ForeignKey<RuleDeck['id']>;
  declare version: number;
  declare state: CreationOptional<DeckVersionState>;
  declare content: Deck;
  declare changeNote: CreationOptional<string>;
  declare createdBy: ForeignKey<User['id']> | null;
  declare publishedBy: ForeignKey<User['id']> | null;
  declare publishedAt: Date | null;
  /** Optimistic lock: Sequelize increments it on every save and refuses a stale one. */
  declare lockVersion: CreationOptional<number>;
  declare parentVersionId: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  declare deck?: NonAttribute<RuleDeck>;
  declare creator?: NonAttribute<User | null>;
  declare publisher?: NonAttribute<User | null>;
  declare parent?: NonAttribute<RuleDeckVersion | null>;

  static initModel(sequelize: Sequelize): void {
    RuleDeckVersion.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        version: { type: DataTypes.INTEGER, allowNull: false },
        state: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'draft' },
        content: { type: DataTypes.JSONB, allowNull: false },
        changeNote: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        publishedAt: { type: DataTypes.DATE, allowNull: true },
        lockVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        parentVersionId: { type: DataTypes.UUID, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'rule_deck_versions', version: 'lockVersion' },
    );
  }
}
