import { DataTypes, fn, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

// Exploration runs (tolerance runs, tube swaps, part searches). The pg-boss queue carries only the run id; this
// table holds the request with the engine input it was made for (the design version), progress, the worker's
// claim and heartbeat (a lost worker is detected by a stale heartbeat and its job retried), and the result.
export async function up({ context: qi }: Ctx) {
  await qi.createTable('explore_runs', {
    id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    scope: { type: DataTypes.STRING(10), allowNull: false },
    project_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'projects', key: 'id' }, onDelete: 'CASCADE' },
    stage_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'stages', key: 'id' }, onDelete: 'CASCADE' },
    design_version: { type: DataTypes.INTEGER, allowNull: false },
    design_hash: { type: DataTypes.STRING(64), allowNull: false },
    params: { type: DataTypes.JSONB, allowNull: false },
    setup: { type: DataTypes.JSONB, allowNull: false },
    status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'queued' },
    cancel_requested: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    progress_done: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    progress_total: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    job_id: { type: DataTypes.UUID, allowNull: true },
    attempt: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
    worker: { type: DataTypes.STRING(120), allowNull: true },
    heartbeat_at: { type: DataTypes.DATE, allowNull: true },
    started_at: { type: DataTypes.DATE, allowNull: true },
    finished_at: { type: DataTypes.DATE, allowNull: true },
    elapsed_ms: { type: DataTypes.INTEGER, allowNull: true },
    result: { type: DataTypes.JSONB, allowNull: true },
    error: { type: DataTypes.JSONB, allowNull: true },
    created_by: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'users', key: 'id' } },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
    updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
  });
  await qi.addIndex('explore_runs', ['stage_id', 'created_at'], { name: 'explore_runs_stage_idx' });
  await qi.addIndex('explore_runs', ['project_id', 'created_at'], { name: 'explore_runs_project_idx' });
  await qi.addIndex('explore_runs', ['status', 'heartbeat_at'], { name: 'explore_runs_status_idx' });
  await qi.sequelize.query(
    `ALTER TABLE explore_runs ADD CONSTRAINT explore_runs_kind_check CHECK (kind IN ('tolerance', 'swap', 'search')),
       ADD CONSTRAINT explore_runs_scope_check CHECK (scope IN ('stage', 'chain')),
       ADD CONSTRAINT explore_runs_status_check CHECK (status IN ('queued', 'running', 'completed', 'failed', 'cancelled'))`,
  );
}

export async function down({ context: qi }: Ctx) {
  await qi.dropTable('explore_runs');
}
