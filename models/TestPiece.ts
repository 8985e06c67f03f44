import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** The STL every entrant prints; its bounding box checks that entries print it at 100 % scale. */
export class TestPiece extends Model<InferAttributes<TestPiece>, InferCreationAttributes<TestPiece>> {
  declare id: CreationOptional<number>;
  declare seasonId: ForeignKey<number>;
  declare storedFileId: ForeignKey<number> | null;
  declare name: string;
  declare format: 'ascii' | 'binary';
  declare triangleCount: number;
  declare sizeXMm: number;
  declare sizeYMm: number;
  declare sizeZMm: number;
  declare volumeMm3: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    TestPiece.init(
      {
        id: { type: DataTypes.INTEGER, primaryKey: true, autoIncrement: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        format: { type: DataTypes.STRING(8), allowNull: false },
        triangleCount: { type: DataTypes.INTEGER, allowNull: false },
        sizeXMm: { type: DataTypes.DOUBLE, allowNull: false },
        sizeYMm: { type: DataTypes.DOUBLE, allowNull: false },
        sizeZMm: { type: DataTypes.DOUBLE, allowNull: false },
        volumeMm3: { type: DataTypes.DOUBLE, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'TestPiece', tableName: 'test_pieces', underscored: true },
    );
  }
}
