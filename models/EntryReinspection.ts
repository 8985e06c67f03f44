import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One rule's result before and after a re-inspection. */
export interface RuleChange {
  metric: string;
  sentence: string;
  /** the rule's earlier wording when it changed, else null */
  sentenceBefore: string | null;
  severity: string;
  before: string | null;
  after: string | null;
  measuredBefore: unknown;
  measuredAfter: unknown;
}

/**
 * What a finished re-inspection did to an entry: the inspection it compared with, the state the
 * entry left and entered (the same when nothing moved), and the rule results that changed.
 */
export class EntryReinspection extends Model<InferAttributes<EntryReinspection>, InferCreationAttributes<EntryReinspection>> {
  declare id: CreationOptional<number>;
  declare entryId: number;
  declare inspectionId: number;
  declare previousInspectionId: number | null;
  declare fromState: string;
  declare toState: string;
  declare changes: RuleChange[];
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    EntryReinspection.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        entryId: { type: DataTypes.INTEGER, allowNull: false },
        inspectionId: { type: DataTypes.INTEGER, allowNull: false, unique: true },
        previousInspectionId: { type: DataTypes.INTEGER, allowNull: true },
        fromState: { type: DataTypes.STRING(20), allowNull: false },
        toState: { type: DataTypes.STRING(20), allowNull: false },
        changes: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'EntryReinspection', tableName: 'entry_reinspections', underscored: true },
    );
  }
}
