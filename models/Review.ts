import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { ReviewDecision } from '@/lib/domain';

/** A judge's decision on an entry. Reviews are never edited; a new decision is a new row. */
export class Review extends Model<InferAttributes<Review>, InferCreationAttributes<Review>> {
  declare id: CreationOptional<number>;
  declare entryId: ForeignKey<number>;
  declare judgeId: ForeignKey<number>;
  declare decision: ReviewDecision;
  declare reasonCodes: CreationOptional<string[]>;
  declare note: CreationOptional<string>;
  declare checklist: CreationOptional<Record<string, unknown>>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Review.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        decision: { type: DataTypes.STRING(16), allowNull: false },
        reasonCodes: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        checklist: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Review', tableName: 'reviews', underscored: true },
    );
  }
}
