import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Append-only record of who did what to which object. */
export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<number>;
  declare actorId: ForeignKey<number> | null;
  declare action: string;
  declare subjectType: string;
  declare subjectId: string;
  declare details: CreationOptional<Record<string, unknown>>;
  declare ip: string | null;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AuditEvent.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        action: { type: DataTypes.STRING(64), allowNull: false },
        subjectType: { type: DataTypes.STRING(32), allowNull: false },
        subjectId: { type: DataTypes.STRING(64), allowNull: false },
        details: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        ip: { type: DataTypes.STRING(64), allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'AuditEvent', tableName: 'audit_events', underscored: true, updatedAt: false },
    );
  }
}
