import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { InspectionStatus } from '@/lib/domain';
import type { FlagJson, InspectionReport, RuleResultJson } from '@/lib/inspection/contract';
import type { ToolpathPreview } from '@/lib/inspection/preview';

/**
 * The engine's report on one entry's G-code (the report contract, lib/inspection/contract.ts) and
 * the toolpath preview built in the same pass. Headline figures are columns for sorting standings.
 */
export class Inspection extends Model<InferAttributes<Inspection>, InferCreationAttributes<Inspection>> {
  declare id: CreationOptional<number>;
  declare entryId: ForeignKey<number>;
  declare storedFileId: ForeignKey<number> | null;
  declare engineVersion: string;
  declare status: CreationOptional<InspectionStatus>;
  declare report: InspectionReport | null;
  /** Built by the same pass as the report; null for rows inspected before previews were kept here. */
  declare preview: CreationOptional<ToolpathPreview | null>;
  declare ruleResults: CreationOptional<RuleResultJson[]>;
  declare flags: CreationOptional<FlagJson[]>;
  declare blockingFailures: CreationOptional<number>;
  declare advisoryFlags: CreationOptional<number>;
  declare peakFlowMm3s: number | null;
  declare p95FlowMm3s: number | null;
  declare estimatedTimeS: number | null;
  declare layerHeightMm: number | null;
  declare error: string | null;
  declare finishedAt: Date | null;
  /** Job record: how many times a worker took this inspection (lib/jobs). */
  declare attempts: CreationOptional<number>;
  /** Job record: a running inspection whose lease passed is taken again (its server stopped). */
  declare leaseUntil: CreationOptional<Date | null>;
  /** Job record: the order of claims (the queue serves the entrant it served least recently). */
  declare claimSeq: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Inspection.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        engineVersion: { type: DataTypes.STRING(32), allowNull: false },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'queued' },
        report: { type: DataTypes.JSON, allowNull: true },
        preview: { type: DataTypes.JSON, allowNull: true },
        ruleResults: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        flags: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        blockingFailures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        advisoryFlags: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        peakFlowMm3s: { type: DataTypes.DOUBLE, allowNull: true },
        p95FlowMm3s: { type: DataTypes.DOUBLE, allowNull: true },
        estimatedTimeS: { type: DataTypes.DOUBLE, allowNull: true },
        layerHeightMm: { type: DataTypes.DOUBLE, allowNull: true },
        error: { type: DataTypes.TEXT, allowNull: true },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        leaseUntil: { type: DataTypes.DATE, allowNull: true },
        claimSeq: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Inspection', tableName: 'inspections', underscored: true },
    );
  }
}
