import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export type MailStatus = 'pending' | 'sent' | 'failed';

/**
 * The outbox: every message Hotlap sends, written in the transaction of the change that causes it
 * and delivered after commit (lib/mail). With SMTP the stored text and html have their token links
 * removed; the deliverable body is kept sealed (encrypted) until it is sent, then dropped.
 */
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
  declare status: CreationOptional<MailStatus>;
  declare attempts: CreationOptional<number>;
  declare nextAttemptAt: CreationOptional<Date | null>;
  declare lastError: CreationOptional<string | null>;
  declare sentAt: CreationOptional<Date | null>;
  /** AES-256-GCM sealed {text, html} while an SMTP message waits to be sent; null afterwards. */
  declare sealed: CreationOptional<string | null>;
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
        status: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'pending' },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        nextAttemptAt: { type: DataTypes.DATE, allowNull: true },
        lastError: { type: DataTypes.TEXT, allowNull: true },
        sentAt: { type: DataTypes.DATE, allowNull: true },
        sealed: { type: DataTypes.TEXT, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'SentMail', tableName: 'sent_mails', underscored: true, updatedAt: false },
    );
  }
}
