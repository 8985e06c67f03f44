import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { TokenPurpose } from '@/lib/domain';

/** One-time links (e-mail verification, password reset). Only the SHA-256 of the token is stored. */
export class AuthToken extends Model<InferAttributes<AuthToken>, InferCreationAttributes<AuthToken>> {
  declare id: CreationOptional<number>;
  declare userId: ForeignKey<number>;
  declare purpose: TokenPurpose;
  declare tokenHash: string;
  declare expiresAt: Date;
  declare usedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AuthToken.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        purpose: { type: DataTypes.STRING(16), allowNull: false },
        tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        usedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'AuthToken', tableName: 'auth_tokens', underscored: true },
    );
  }
}
