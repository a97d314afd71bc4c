import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Decision extends Model<InferAttributes<Decision>, InferCreationAttributes<Decision>> {
  declare id: CreationOptional<number>;
  declare revisionId: number;
  declare reviewerId: number | null;
  declare decision: 'approve' | 'request-changes';
  declare comment: CreationOptional<string>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Decision.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        revisionId: { type: DataTypes.INTEGER, allowNull: false },
        reviewerId: { type: DataTypes.INTEGER, allowNull: true },
        decision: { type: DataTypes.STRING(20), allowNull: false },
        comment: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        createdAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'Decision', tableName: 'decisions', underscored: true, updatedAt: false },
    );
  }
}
