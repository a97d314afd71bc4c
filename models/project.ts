import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { ChainLink } from '../lib/calc/chain/input';
import type { ProjectSupplyCircuitRecord, ProjectSupplyRecord } from './types';

export class Project extends Model<InferAttributes<Project>, InferCreationAttributes<Project>> {
  declare id: CreationOptional<number>;
  declare name: string;
  declare description: CreationOptional<string>;
  declare status: CreationOptional<'draft' | 'in-review' | 'approved' | 'changes-requested'>;
  declare archived: CreationOptional<boolean>;
  declare ownerId: number | null;
  declare supply: CreationOptional<ProjectSupplyRecord>;
  declare supplyCircuit: CreationOptional<ProjectSupplyCircuitRecord | null>;
  /** signal-chain links between stages (null: capacitor coupling in stage order) */
  declare chainLinks: CreationOptional<ChainLink[] | null>;
  declare benchTolerances: CreationOptional<Record<string, number>>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Project.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'draft' },
        archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        ownerId: { type: DataTypes.INTEGER, allowNull: true },
        supply: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        supplyCircuit: { type: DataTypes.JSONB, allowNull: true },
        chainLinks: { type: DataTypes.JSONB, allowNull: true },
        benchTolerances: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Project', tableName: 'projects', underscored: true },
    );
  }
}
