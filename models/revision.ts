import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class Revision extends Model<InferAttributes<Revision>, InferCreationAttributes<Revision>> {
  declare id: CreationOptional<number>;
  declare projectId: number;
  declare number: number;
  declare snapshot: Record<string, unknown>;
  declare contentHash: string;
  declare state: CreationOptional<'submitted' | 'approved' | 'changes-requested'>;
  declare submittedById: number | null;
  declare submittedAt: CreationOptional<Date>;
  declare decidedAt: Date | null;

  static initModel(sequelize: Sequelize) {
    Revision.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        projectId: { type: DataTypes.INTEGER, allowNull: false },
        number: { type: DataTypes.INTEGER, allowNull: false },
        snapshot: { type: DataTypes.JSONB, allowNull: false },
        contentHash: { type: DataTypes.STRING(64), allowNull: false },
        state: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'submitted' },
        submittedById: { type: DataTypes.INTEGER, allowNull: true },
        submittedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
        decidedAt: { type: DataTypes.DATE, allowNull: true },
      },
      { sequelize, modelName: 'Revision', tableName: 'revisions', underscored: true, timestamps: false },
    );
  }
}
