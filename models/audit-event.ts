import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<string>;
  declare actorId: number | null;
  declare action: string;
  declare targetType: string;
  declare targetId: string | null;
  declare projectId: number | null;
  declare details: CreationOptional<Record<string, unknown>>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AuditEvent.init(
      {
        id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
        actorId: { type: DataTypes.INTEGER, allowNull: true },
        action: { type: DataTypes.STRING(60), allowNull: false },
        targetType: { type: DataTypes.STRING(40), allowNull: false },
        targetId: { type: DataTypes.STRING(40), allowNull: true },
        projectId: { type: DataTypes.INTEGER, allowNull: true },
        details: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        createdAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'AuditEvent', tableName: 'audit_events', underscored: true, updatedAt: false },
    );
  }
}
