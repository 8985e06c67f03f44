import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A rulebook line: metric + comparator + value (+ tolerance) + severity. classId null = season-wide. */
export class Rule extends Model<InferAttributes<Rule>, InferCreationAttributes<Rule>> {
  declare id: CreationOptional<number>;
  declare seasonId: ForeignKey<number>;
  declare classId: ForeignKey<number> | null;
  declare metric: string;
  declare comparator: string;
  declare value: number;
  declare valueMax: number | null;
  declare tolerance: CreationOptional<number>;
  declare severity: 'blocking' | 'advisory';
  declare sentence: CreationOptional<string>;
  declare position: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Rule.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        metric: { type: DataTypes.STRING(64), allowNull: false },
        comparator: { type: DataTypes.STRING(16), allowNull: false },
        value: { type: DataTypes.DOUBLE, allowNull: false },
        valueMax: { type: DataTypes.DOUBLE, allowNull: true },
        tolerance: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        severity: { type: DataTypes.STRING(16), allowNull: false },
        sentence: { type: DataTypes.STRING(300), allowNull: false, defaultValue: '' },
        position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Rule', tableName: 'rules', underscored: true },
    );
  }
}
