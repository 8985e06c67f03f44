import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A judge appointed to one season. */
export class SeasonJudge extends Model<InferAttributes<SeasonJudge>, InferCreationAttributes<SeasonJudge>> {
  declare seasonId: number;
  declare userId: number;
  declare appointedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SeasonJudge.init(
      {
        seasonId: { type: DataTypes.INTEGER, primaryKey: true },
        userId: { type: DataTypes.INTEGER, primaryKey: true },
        appointedById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'SeasonJudge', tableName: 'season_judges', underscored: true },
    );
  }
}
