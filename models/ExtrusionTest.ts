import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export interface ExtrusionStep {
  rateMm3s: number;
  massG: number;
}

/** A weighed extrusion-limit test of one machine with one material. */
export class ExtrusionTest extends Model<InferAttributes<ExtrusionTest>, InferCreationAttributes<ExtrusionTest>> {
  declare id: CreationOptional<number>;
  declare machineId: ForeignKey<number>;
  declare materialFamily: string;
  declare materialName: CreationOptional<string>;
  declare filamentDiameterMm: number;
  declare sampleLengthMm: number;
  declare referenceMassG: number;
  declare thresholdPercent: CreationOptional<number>;
  declare steps: ExtrusionStep[];
  /** Highest rate at or above the threshold; null when no step passed. */
  declare limitFlowMm3s: number | null;
  declare testedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ExtrusionTest.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        materialFamily: { type: DataTypes.STRING(16), allowNull: false },
        materialName: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
        filamentDiameterMm: { type: DataTypes.DOUBLE, allowNull: false },
        sampleLengthMm: { type: DataTypes.DOUBLE, allowNull: false },
        referenceMassG: { type: DataTypes.DOUBLE, allowNull: false },
        thresholdPercent: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 98 },
        steps: { type: DataTypes.JSON, allowNull: false },
        limitFlowMm3s: { type: DataTypes.DOUBLE, allowNull: true },
        testedAt: { type: DataTypes.DATE, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'ExtrusionTest', tableName: 'extrusion_tests', underscored: true },
    );
  }
}
