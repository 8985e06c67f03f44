import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/**
 * Content fingerprints of a stored G-code: `contentSha256` of the decompressed bytes (a .gz and its
 * plain copy match), `movesSha256` of the lines with comments and whitespace left out (a copy with
 * edited comments matches).
 */
export class GcodeFingerprint extends Model<InferAttributes<GcodeFingerprint>, InferCreationAttributes<GcodeFingerprint>> {
  declare storedFileId: number;
  declare contentSha256: string;
  declare movesSha256: string;
  declare lines: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    GcodeFingerprint.init(
      {
        storedFileId: { type: DataTypes.INTEGER, primaryKey: true },
        contentSha256: { type: DataTypes.STRING(64), allowNull: false },
        movesSha256: { type: DataTypes.STRING(64), allowNull: false },
        lines: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'GcodeFingerprint', tableName: 'gcode_fingerprints', underscored: true },
    );
  }
}
