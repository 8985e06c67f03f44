import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { MotionSystem } from '@/lib/domain';

/** An entrant's printer profile. */
export class Machine extends Model<InferAttributes<Machine>, InferCreationAttributes<Machine>> {
  declare id: CreationOptional<number>;
  declare ownerId: ForeignKey<number>;
  declare name: string;
  declare motionSystem: MotionSystem;
  declare buildXMm: number;
  declare buildYMm: number;
  declare buildZMm: number;
  declare nozzleMm: number;
  declare hotend: CreationOptional<string>;
  declare extruder: CreationOptional<string>;
  declare firmware: CreationOptional<string>;
  declare maxAccelMmS2: number | null;
  declare maxSpeedMms: number | null;
  declare modifications: CreationOptional<string>;
  declare isModified: CreationOptional<boolean>;
  declare retiredAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Machine.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        motionSystem: { type: DataTypes.STRING(16), allowNull: false },
        buildXMm: { type: DataTypes.DOUBLE, allowNull: false },
        buildYMm: { type: DataTypes.DOUBLE, allowNull: false },
        buildZMm: { type: DataTypes.DOUBLE, allowNull: false },
        nozzleMm: { type: DataTypes.DOUBLE, allowNull: false },
        hotend: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
        extruder: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
        firmware: { type: DataTypes.STRING(200), allowNull: false, defaultValue: '' },
        maxAccelMmS2: { type: DataTypes.DOUBLE, allowNull: true },
        maxSpeedMms: { type: DataTypes.DOUBLE, allowNull: true },
        modifications: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        isModified: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        retiredAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Machine', tableName: 'machines', underscored: true },
    );
  }
}
