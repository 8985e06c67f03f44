import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Every message Hotlap sends; with the local fake transport this is the outbox itself. */
export class SentMail extends Model<InferAttributes<SentMail>, InferCreationAttributes<SentMail>> {
  declare id: CreationOptional<number>;
  declare to: string;
  declare subject: string;
  declare text: string;
  declare html: string;
  declare transport: 'fake' | 'smtp';
  declare messageId: string | null;
  /** RFC 5322 source as built by nodemailer (fake transport only). */
  declare raw: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SentMail.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        to: { type: DataTypes.STRING(254), allowNull: false },
        subject: { type: DataTypes.STRING(300), allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: false },
        html: { type: DataTypes.TEXT, allowNull: false },
        transport: { type: DataTypes.STRING(8), allowNull: false },
        messageId: { type: DataTypes.STRING(300), allowNull: true },
        raw: { type: DataTypes.TEXT, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'SentMail', tableName: 'sent_mails', underscored: true, updatedAt: false },
    );
  }
}
