import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class CurveSet extends Model<InferAttributes<CurveSet>, InferCreationAttributes<CurveSet>> {
  declare id: CreationOptional<number>;
  declare tubeTypeId: number;
  declare name: string;
  declare kind: 'triode' | 'pentode';
  declare currentUnit: 'mA' | 'A';
  declare fileName: string;
  declare objectKey: string;
  declare byteSize: number;
  declare pointCount: number;
  declare demo: CreationOptional<boolean>;
  declare notes: CreationOptional<string>;
  declare uploadedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CurveSet.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        tubeTypeId: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        kind: { type: DataTypes.STRING(20), allowNull: false },
        currentUnit: { type: DataTypes.STRING(4), allowNull: false },
        fileName: { type: DataTypes.STRING(200), allowNull: false },
        objectKey: { type: DataTypes.STRING(300), allowNull: false },
        byteSize: { type: DataTypes.INTEGER, allowNull: false },
        pointCount: { type: DataTypes.INTEGER, allowNull: false },
        demo: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        uploadedById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'CurveSet', tableName: 'curve_sets', underscored: true },
    );
  }
}
