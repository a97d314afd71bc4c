import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Stage extends Model<InferAttributes<Stage>, InferCreationAttributes<Stage>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare position: number;
  declare name: string;
  declare topology: string;
  declare tubeTypeId: number;
  declare tubeModelId: number | null;
  declare supplyNode: string | null;
  declare inputs: Record<string, unknown>;
  declare analysis: Record<string, unknown> | null;
  declare analysisError: Record<string, unknown> | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Stage.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER, allowNull: false },
        position: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        topology: { type: DataTypes.STRING(30), allowNull: false },
        tubeTypeId: { type: DataTypes.INTEGER, allowNull: false },
        tubeModelId: { type: DataTypes.INTEGER, allowNull: true },
        supplyNode: { type: DataTypes.STRING(40), allowNull: true },
        inputs: { type: DataTypes.JSONB, allowNull: false },
        analysis: { type: DataTypes.JSONB, allowNull: true },
        analysisError: { type: DataTypes.JSONB, allowNull: true },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Stage', tableName: 'stages', underscored: true },
    );
  }
}
