import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { TubeCapacitancesRecord, TubeHeater, TubeRatingsRecord, TypicalPoint } from './types';

export class TubeType extends Model<InferAttributes<TubeType>, InferCreationAttributes<TubeType>> {
  declare id: CreationOptional<number>;
  declare designation: string;
  declare aliases: CreationOptional<string[]>;
  declare family: 'triode' | 'pentode' | 'beam-tetrode';
  declare sections: CreationOptional<number>;
  declare heater: CreationOptional<TubeHeater>;
  declare ratings: CreationOptional<TubeRatingsRecord>;
  declare capacitances: CreationOptional<TubeCapacitancesRecord>;
  declare typicalPoints: CreationOptional<TypicalPoint[]>;
  declare notes: CreationOptional<string>;
  declare published: CreationOptional<boolean>;
  declare retired: CreationOptional<boolean>;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    TubeType.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        designation: { type: DataTypes.STRING(60), allowNull: false },
        aliases: { type: DataTypes.ARRAY(DataTypes.STRING(60)), allowNull: false, defaultValue: [] },
        family: { type: DataTypes.STRING(20), allowNull: false },
        sections: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        heater: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        ratings: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        capacitances: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        typicalPoints: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        published: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'TubeType', tableName: 'tube_types', underscored: true },
    );
  }
}
