import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class BenchCheck extends Model<InferAttributes<BenchCheck>, InferCreationAttributes<BenchCheck>> {
  declare id: CreationOptional<number>;
  declare stageId: number;
  declare projectId: number;
  declare technicianId: number | null;
  declare readings: Record<string, unknown>;
  declare comparisons: Record<string, unknown>[];
  declare verdict: 'pass' | 'check' | 'fail';
  declare tubeSerial: CreationOptional<string>;
  declare notes: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    BenchCheck.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        stageId: { type: DataTypes.INTEGER, allowNull: false },
        projectId: { type: DataTypes.INTEGER, allowNull: false },
        technicianId: { type: DataTypes.INTEGER, allowNull: true },
        readings: { type: DataTypes.JSONB, allowNull: false },
        comparisons: { type: DataTypes.JSONB, allowNull: false },
        verdict: { type: DataTypes.STRING(10), allowNull: false },
        tubeSerial: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        createdAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'BenchCheck', tableName: 'bench_checks', underscored: true, updatedAt: false },
    );
  }
}
