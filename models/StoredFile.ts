import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { StoredFileKind } from '@/lib/domain';

/** A file kept on disk under data/uploads (storageKey is relative to the storage root). */
export class StoredFile extends Model<InferAttributes<StoredFile>, InferCreationAttributes<StoredFile>> {
  declare id: CreationOptional<number>;
  declare ownerId: ForeignKey<number> | null;
  declare entryId: ForeignKey<number> | null;
  declare kind: StoredFileKind;
  declare originalName: string;
  declare mime: string;
  declare sizeBytes: number;
  declare sha256: string;
  declare storageKey: string;
  declare meta: CreationOptional<Record<string, unknown>>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    StoredFile.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        kind: { type: DataTypes.STRING(16), allowNull: false },
        originalName: { type: DataTypes.STRING(255), allowNull: false },
        mime: { type: DataTypes.STRING(100), allowNull: false },
        sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
        sha256: { type: DataTypes.STRING(64), allowNull: false },
        storageKey: { type: DataTypes.STRING(300), allowNull: false, unique: true },
        meta: { type: DataTypes.JSON, allowNull: false, defaultValue: {} },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'StoredFile', tableName: 'stored_files', underscored: true },
    );
  }
}
