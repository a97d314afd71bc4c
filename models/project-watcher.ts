import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class ProjectWatcher extends Model<InferAttributes<ProjectWatcher>, InferCreationAttributes<ProjectWatcher>> {
  declare projectId: number;
  declare userId: number;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ProjectWatcher.init(
      {
        projectId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
        userId: { type: DataTypes.INTEGER, allowNull: false, primaryKey: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'ProjectWatcher', tableName: 'project_watchers', underscored: true, updatedAt: false },
    );
  }
}
