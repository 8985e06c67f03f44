import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { SeasonState } from '@/lib/domain';

export class Season extends Model<InferAttributes<Season>, InferCreationAttributes<Season>> {
  declare id: CreationOptional<number>;
  declare slug: string;
  declare name: string;
  declare hostName: string;
  declare description: CreationOptional<string>;
  declare state: CreationOptional<SeasonState>;
  declare opensAt: Date;
  declare closesAt: Date;
  declare timeZone: CreationOptional<string>;
  /** What the clock measures, in the organizer's words (e.g. first to last extrusion). */
  declare timingConvention: CreationOptional<string>;
  declare photosRequired: CreationOptional<number>;
  declare videoRequired: CreationOptional<boolean>;
  declare entryLimit: CreationOptional<number>;
  /** Verifying reviews an entry needs before it counts. */
  declare verificationsRequired: CreationOptional<number>;
  declare rulesFrozenAt: Date | null;
  /** What each required photo must show, in the organizer's words (e.g. "bridge window close-up"). */
  declare photoKinds: CreationOptional<string[]>;
  /** Set when the season went final: its standings no longer change. */
  declare standingsFrozenAt: CreationOptional<Date | null>;
  /** Last time an organizer asked to re-inspect every entry (after a rulebook change). */
  declare reinspectRequestedAt: CreationOptional<Date | null>;
  declare createdById: ForeignKey<number> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Season.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        slug: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        hostName: { type: DataTypes.STRING(120), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        state: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'draft' },
        opensAt: { type: DataTypes.DATE, allowNull: false },
        closesAt: { type: DataTypes.DATE, allowNull: false },
        timeZone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' },
        timingConvention: { type: DataTypes.STRING(300), allowNull: false, defaultValue: 'First extrusion to last extrusion' },
        photosRequired: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 2 },
        videoRequired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        entryLimit: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 3 },
        verificationsRequired: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        rulesFrozenAt: { type: DataTypes.DATE, allowNull: true },
        photoKinds: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        standingsFrozenAt: { type: DataTypes.DATE, allowNull: true },
        reinspectRequestedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Season', tableName: 'seasons', underscored: true },
    );
  }
}
