import { DataTypes, fn, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
};

export async function up({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.createTable(
      'projects',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        name: { type: DataTypes.STRING(120), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'draft' },
        archived: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        owner_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        supply: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        bench_tolerances: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        ...timestamps,
      },
      { transaction },
    );
    await qi.sequelize.query(
      `ALTER TABLE projects ADD CONSTRAINT projects_status_check CHECK (status IN ('draft','in-review','approved','changes-requested'))`,
      { transaction },
    );
    await qi.createTable(
      'project_watchers',
      {
        project_id: { type: DataTypes.INTEGER, primaryKey: true, references: { model: 'projects', key: 'id' }, onDelete: 'CASCADE' },
        user_id: { type: DataTypes.INTEGER, primaryKey: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
      },
      { transaction },
    );
    await qi.createTable(
      'stages',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        project_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'projects', key: 'id' }, onDelete: 'CASCADE' },
        position: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        topology: { type: DataTypes.STRING(30), allowNull: false },
        tube_type_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'tube_types', key: 'id' }, onDelete: 'RESTRICT' },
        tube_model_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'tube_models', key: 'id' }, onDelete: 'SET NULL' },
        supply_node: { type: DataTypes.STRING(40), allowNull: true },
        inputs: { type: DataTypes.JSONB, allowNull: false },
        analysis: { type: DataTypes.JSONB, allowNull: true },
        analysis_error: { type: DataTypes.JSONB, allowNull: true },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        ...timestamps,
      },
      { transaction },
    );
    await qi.addIndex('stages', ['project_id', 'position'], { transaction });
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.dropTable('stages', { transaction });
    await qi.dropTable('project_watchers', { transaction });
    await qi.dropTable('projects', { transaction });
  });
}
