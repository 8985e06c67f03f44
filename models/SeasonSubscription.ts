import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A signed-in person who asked for a season's announcement mails (lifecycle changes). */
export class SeasonSubscription extends Model<InferAttributes<SeasonSubscription>, InferCreationAttributes<SeasonSubscription>> {
  declare id: CreationOptional<number>;
  declare seasonId: ForeignKey<number>;
  declare userId: ForeignKey<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SeasonSubscription.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        seasonId: { type: DataTypes.INTEGER, allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'SeasonSubscription', tableName: 'season_subscriptions', underscored: true },
    );
  }
}
