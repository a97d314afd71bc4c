import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class CurveFit extends Model<InferAttributes<CurveFit>, InferCreationAttributes<CurveFit>> {
  declare id: CreationOptional<number>;
  declare curveSetId: number;
  declare model: 'koren-triode' | 'koren-pentode';
  declare parameters: Record<string, number>;
  declare rmsErrorPercent: number;
  declare maxErrorPercent: number;
  declare status: CreationOptional<'proposed' | 'accepted' | 'discarded'>;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CurveFit.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        curveSetId: { type: DataTypes.INTEGER, allowNull: false },
        model: { type: DataTypes.STRING(30), allowNull: false },
        parameters: { type: DataTypes.JSONB, allowNull: false },
        rmsErrorPercent: { type: DataTypes.DOUBLE, allowNull: false },
        maxErrorPercent: { type: DataTypes.DOUBLE, allowNull: false },
        status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'proposed' },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'CurveFit', tableName: 'curve_fits', underscored: true },
    );
  }
}
