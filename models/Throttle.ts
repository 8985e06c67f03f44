import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Failed sign-in counters per e-mail and per client address (see lib/auth/throttle.ts). */
export class Throttle extends Model<InferAttributes<Throttle>, InferCreationAttributes<Throttle>> {
  declare key: string;
  declare failures: number;
  declare windowStart: Date;
  declare lockedUntil: Date | null;

  static initModel(sequelize: Sequelize) {
    Throttle.init(
      {
        key: { type: DataTypes.STRING(300), primaryKey: true },
        failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        windowStart: { type: DataTypes.DATE, allowNull: false },
        lockedUntil: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, modelName: 'Throttle', tableName: 'throttles', underscored: true, timestamps: false },
    );
  }
}
