import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { EntryState } from '@/lib/domain';

/** One timed run in one class of one season. */
export class Entry extends Model<InferAttributes<Entry>, InferCreationAttributes<Entry>> {
  declare id: CreationOptional<number>;
  declare seasonId: ForeignKey<number>;
  declare classId: ForeignKey<number>;
  declare entrantId: ForeignKey<number>;
  declare machineId: ForeignKey<number>;
  declare materialFamily: string;
  declare materialName: CreationOptional<string>;
  declare nozzleMm: number;
  declare claimedTimeMs: number;
  declare evidenceUrl: CreationOptional<string>;
  declare measuredXMm: number | null;
  declare measuredYMm: number | null;
  declare measuredZMm: number | null;
  declare notes: CreationOptional<string>;
  declare state: CreationOptional<EntryState>;
  declare gcodeSha256: string | null;
  declare submittedAt: Date | null;
  declare decidedAt: Date | null;
  /** When a re-inspection sent the entry back to the judges (starts a new round of verifications). */
  declare reopenedAt: CreationOptional<Date | null>;
  /** The inspection current when the entrant submitted; a judge may verify only while it still is. */
  declare submittedInspectionId: CreationOptional<number | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Entry.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        materialFamily: { type: DataTypes.STRING(16), allowNull: false },
        materialName: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
        nozzleMm: { type: DataTypes.DOUBLE, allowNull: false },
        claimedTimeMs: { type: DataTypes.INTEGER, allowNull: false },
        evidenceUrl: { type: DataTypes.STRING(500), allowNull: false, defaultValue: '' },
        measuredXMm: { type: DataTypes.DOUBLE, allowNull: true },
        measuredYMm: { type: DataTypes.DOUBLE, allowNull: true },
        measuredZMm: { type: DataTypes.DOUBLE, allowNull: true },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        state: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'draft' },
        gcodeSha256: { type: DataTypes.STRING(64), allowNull: true },
        submittedAt: { type: DataTypes.DATE, allowNull: true },
        decidedAt: { type: DataTypes.DATE, allowNull: true },
        reopenedAt: { type: DataTypes.DATE, allowNull: true, defaultValue: null },
        submittedInspectionId: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Entry', tableName: 'entries', underscored: true },
    );
  }
}
