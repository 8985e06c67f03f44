import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** A co-organizer of one season, added by an organizer of that season (the creator is implied by `seasons.created_by_id`). */
export class SeasonOrganizer extends Model<InferAttributes<SeasonOrganizer>, InferCreationAttributes<SeasonOrganizer>> {
  declare seasonId: number;
  declare userId: number;
  declare addedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SeasonOrganizer.init(
      {
        seasonId: { type: DataTypes.INTEGER, primaryKey: true },
        userId: { type: DataTypes.INTEGER, primaryKey: true },
        addedById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'SeasonOrganizer', tableName: 'season_organizers', underscored: true },
    );
  }
}
