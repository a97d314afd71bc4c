import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class TubeModel extends Model<InferAttributes<TubeModel>, InferCreationAttributes<TubeModel>> {
  declare id: CreationOptional<number>;
  declare tubeTypeId: number;
  declare name: string;
  declare kind: 'koren-triode' | 'koren-pentode';
  declare parameters: Record<string, number>;
  declare source: string;
  declare isDefault: CreationOptional<boolean>;
  declare published: CreationOptional<boolean>;
  declare curveFitId: number | null;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    TubeModel.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        tubeTypeId: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        kind: { type: DataTypes.STRING(30), allowNull: false },
        parameters: { type: DataTypes.JSONB, allowNull: false },
        source: { type: DataTypes.TEXT, allowNull: false },
        isDefault: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        published: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        curveFitId: { type: DataTypes.INTEGER, allowNull: true },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'TubeModel', tableName: 'tube_models', underscored: true },
    );
  }
}
