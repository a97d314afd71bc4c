import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class CurvePoint extends Model<InferAttributes<CurvePoint>, InferCreationAttributes<CurvePoint>> {
  declare id: CreationOptional<number>;
  declare curveSetId: number;
  declare gridVoltage: number;
  declare plateVoltage: number;
  declare plateCurrent: number;
  declare screenVoltage: number | null;
  declare screenCurrent: number | null;

  static initModel(sequelize: Sequelize) {
    CurvePoint.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        curveSetId: { type: DataTypes.INTEGER, allowNull: false },
        gridVoltage: { type: DataTypes.DOUBLE, allowNull: false },
        plateVoltage: { type: DataTypes.DOUBLE, allowNull: false },
        plateCurrent: { type: DataTypes.DOUBLE, allowNull: false },
        screenVoltage: { type: DataTypes.DOUBLE, allowNull: true },
        screenCurrent: { type: DataTypes.DOUBLE, allowNull: true },
      },
      { sequelize, modelName: 'CurvePoint', tableName: 'curve_points', underscored: true, timestamps: false },
    );
  }
}
