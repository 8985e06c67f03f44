import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/**
 * An e-mailed invitation to judge one season. Only the SHA-256 of the link's token is kept; the
 * invitation is accepted by whoever signs in with the invited address.
 */
export class JudgeInvitation extends Model<InferAttributes<JudgeInvitation>, InferCreationAttributes<JudgeInvitation>> {
  declare id: CreationOptional<number>;
  declare seasonId: ForeignKey<number>;
  declare email: string;
  declare tokenHash: string;
  declare invitedById: ForeignKey<number> | null;
  declare expiresAt: Date;
  declare acceptedAt: Date | null;
  declare acceptedById: ForeignKey<number> | null;
  declare revokedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    JudgeInvitation.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        seasonId: { type: DataTypes.INTEGER, allowNull: false },
        invitedById: { type: DataTypes.INTEGER, allowNull: true },
        acceptedById: { type: DataTypes.INTEGER, allowNull: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        acceptedAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'JudgeInvitation', tableName: 'judge_invitations', underscored: true },
    );
  }
}
