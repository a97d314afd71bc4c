import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export type ExploreRunKind = 'tolerance' | 'swap' | 'search';
export type ExploreRunStatus = 'queued' | 'running' | 'completed' | 'failed' | 'cancelled';

export class ExploreRun extends Model<InferAttributes<ExploreRun>, InferCreationAttributes<ExploreRun>> {
  declare id: CreationOptional<number>;
  declare kind: ExploreRunKind;
  declare scope: 'stage' | 'chain';
  declare projectId: number;
  declare stageId: number | null;
  declare designVersion: number;
  declare designHash: string;
  declare params: Record<string, unknown>;
  declare setup: Record<string, unknown>;
  declare status: CreationOptional<ExploreRunStatus>;
  declare cancelRequested: CreationOptional<boolean>;
  declare progressDone: CreationOptional<number>;
  declare progressTotal: CreationOptional<number>;
  declare jobId: string | null;
  declare attempt: CreationOptional<number>;
  declare worker: string | null;
  declare heartbeatAt: Date | null;
  declare startedAt: Date | null;
  declare finishedAt: Date | null;
  declare elapsedMs: number | null;
  declare result: Record<string, unknown> | null;
  declare error: { code: string; message: string } | null;
  declare createdBy: number;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    ExploreRun.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        kind: { type: DataTypes.STRING(20), allowNull: false },
        scope: { type: DataTypes.STRING(10), allowNull: false },
        projectId: { type: DataTypes.INTEGER, allowNull: false },
        stageId: { type: DataTypes.INTEGER, allowNull: true },
        designVersion: { type: DataTypes.INTEGER, allowNull: false },
        designHash: { type: DataTypes.STRING(64), allowNull: false },
        params: { type: DataTypes.JSONB, allowNull: false },
        setup: { type: DataTypes.JSONB, allowNull: false },
        status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'queued' },
        cancelRequested: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        progressDone: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        progressTotal: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        jobId: { type: DataTypes.UUID, allowNull: true },
        attempt: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        worker: { type: DataTypes.STRING(120), allowNull: true },
        heartbeatAt: { type: DataTypes.DATE, allowNull: true },
        startedAt: { type: DataTypes.DATE, allowNull: true },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        elapsedMs: { type: DataTypes.INTEGER, allowNull: true },
        result: { type: DataTypes.JSONB, allowNull: true },
        error: { type: DataTypes.JSONB, allowNull: true },
        createdBy: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, modelName: 'ExploreRun', tableName: 'explore_runs', underscored: true },
    );
  }
}
