import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { MotionSystem } from '@/lib/domain';

/** One ranked table inside a season, with its eligibility. ("Class" is a reserved word in code.) */
export class ContestClass extends Model<InferAttributes<ContestClass>, InferCreationAttributes<ContestClass>> {
  declare id: CreationOptional<number>;
  declare seasonId: ForeignKey<number>;
  declare slug: string;
  declare name: string;
  declare description: CreationOptional<string>;
  /** Eligible nozzle diameters in mm; empty = any. */
  declare nozzleDiametersMm: CreationOptional<number[]>;
  /** Minimum nozzle diameter (for "0.6 mm and up" classes); null = no minimum. */
  declare nozzleMinMm: number | null;
  declare materialFamilies: CreationOptional<string[]>;
  declare motionSystems: CreationOptional<MotionSystem[]>;
  /** Build-volume band by the longest axis, mm. */
  declare buildVolumeMinMm: number | null;
  declare buildVolumeMaxMm: number | null;
  declare modification: CreationOptional<'stock' | 'modified' | 'any'>;
  declare displayOrder: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ContestClass.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        slug: { type: DataTypes.STRING(64), allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        nozzleDiametersMm: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        nozzleMinMm: { type: DataTypes.DOUBLE, allowNull: true },
        materialFamilies: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        motionSystems: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        buildVolumeMinMm: { type: DataTypes.DOUBLE, allowNull: true },
        buildVolumeMaxMm: { type: DataTypes.DOUBLE, allowNull: true },
        modification: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'any' },
        displayOrder: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'ContestClass', tableName: 'classes', underscored: true },
    );
  }
}
