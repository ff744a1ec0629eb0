import {
  DataTypes,
  Model,
  type CreationOptional,
  type ForeignKey,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { Severity } from '../../../shared/deck';
import type { CheckSummary, FindingPlot, Quantity } from '../../../shared/findings';
import type { RunBreakdown, RunDiagnostic, RunProgress } from '../../../shared/api/runs';
import type { Block } from './block';
import type { Netlist } from './netlist';
import type { RuleDeckVersion } from './rule-deck';
import type { Team } from './team';
import type { User } from './user';

export type RunState = 'queued' | 'running' | 'succeeded' | 'failed' | 'cancelled';

/** A check of one netlist set against one deck version. PostgreSQL is the truth about runs; the queue only carries work. */
export class Run extends Model<InferAttributes<Run>, InferCreationAttributes<Run>> {
  declare id: CreationOptional<string>;
  declare teamId: ForeignKey<Team['id']>;
  declare blockId: ForeignKey<Block['id']>;
  declare netlistId: ForeignKey<Netlist['id']>;
  declare deckVersionId: ForeignKey<RuleDeckVersion['id']>;
  declare submittedBy: ForeignKey<User['id']> | null;
  declare state: CreationOptional<RunState>;
  declare progress: RunProgress | null;
  declare attempt: CreationOptional<number>;
  declare error: string | null;
  declare summary: CheckSummary | null;
  declare note: CreationOptional<string>;
  /** Cell the check starts from; null: every cell nobody instantiates. */
  declare topCell: CreationOptional<string | null>;
  /** Child jobs of a split run; null while it is one job. */
  declare parts: CreationOptional<number | null>;
  /** What the netlist reader reported (warnings of a succeeded run, errors of a failed one). */
  declare diagnostics: CreationOptional<RunDiagnostic[]>;
  /** Findings per rule and per cell, written with the findings. */
  declare breakdown: CreationOptional<RunBreakdown | null>;
  declare cancelledBy: CreationOptional<ForeignKey<User['id']> | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare startedAt: Date | null;
  declare finishedAt: Date | null;

  static initModel(sequelize: Sequelize): void {
    Run.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        state: { type: DataTypes.TEXT, allowNull: false, defaultValue: 'queued' },
        progress: { type: DataTypes.JSONB, allowNull: true },
        attempt: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        error: { type: DataTypes.TEXT, allowNull: true },
        summary: { type: DataTypes.JSONB, allowNull: true },
        note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        topCell: { type: DataTypes.TEXT, allowNull: true },
        parts: { type: DataTypes.INTEGER, allowNull: true },
        diagnostics: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        breakdown: { type: DataTypes.JSONB, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
        startedAt: { type: DataTypes.DATE, allowNull: true },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, tableName: 'runs' },
    );
  }
}

/** One stored finding: every field of shared/findings.ts Finding, plus its run. */
export class FindingRow extends Model<InferAttributes<FindingRow>, InferCreationAttributes<FindingRow>> {
  declare id: CreationOptional<number>;
  declare runId: ForeignKey<Run['id']>;
  declare ruleId: string;
  declare severity: Severity;
  declare message: string;
  declare file: string;
  declare line: number;
  declare column: number;
  declare cell: string;
  declare nets: string[];
  declare devices: string[];
  declare instances: number;
  declare measured: Quantity | null;
  declare limit: Quantity | null;
  declare fingerprint: string;
  declare corner: string | null;
  declare plot: FindingPlot | null;

  static initModel(sequelize: Sequelize): void {
    FindingRow.init(
      {
        id: { type: DataTypes.BIGINT, primaryKey: true, autoIncrement: true },
        ruleId: { type: DataTypes.TEXT, allowNull: false },
        severity: { type: DataTypes.TEXT, allowNull: false },
        message: { type: DataTypes.TEXT, allowNull: false },
        file: { type: DataTypes.TEXT, allowNull: false },
        line: { type: DataTypes.INTEGER, allowNull: false },
        column: { type: DataTypes.INTEGER, allowNull: false },
        cell: { type: DataTypes.TEXT, allowNull: false },
        nets: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        devices: { type: DataTypes.ARRAY(DataTypes.TEXT), allowNull: false, defaultValue: [] },
        instances: { type: DataTypes.DOUBLE, allowNull: false },
        measured: { type: DataTypes.JSONB, allowNull: true },
        limit: { type: DataTypes.JSONB, allowNull: true },
        fingerprint: { type: DataTypes.TEXT, allowNull: false },
        corner: { type: DataTypes.TEXT, allowNull: true },
        plot: { type: DataTypes.JSONB, allowNull: true },
      },
      { sequelize, tableName: 'findings', timestamps: false },
    );
  }
}
