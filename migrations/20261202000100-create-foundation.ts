import { DataTypes, fn, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
};

export async function up({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.createTable(
      'users',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false, unique: true },
        display_name: { type: DataTypes.STRING(120), allowNull: false },
        password_hash: { type: DataTypes.STRING(100), allowNull: true },
        role: { type: DataTypes.STRING(20), allowNull: false },
        active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        ...timestamps,
      },
      { transaction },
    );
    await qi.sequelize.query(
      `ALTER TABLE users ADD CONSTRAINT users_role_check CHECK (role IN ('admin','designer','technician','reviewer'));
       ALTER TABLE users ADD CONSTRAINT users_email_lower CHECK (email = lower(email));`,
      { transaction },
    );
    await qi.createTable(
      'invitations',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        role: { type: DataTypes.STRING(20), allowNull: false },
        token_hash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        expires_at: { type: DataTypes.DATE, allowNull: false },
        used_at: { type: DataTypes.DATE, allowNull: true },
        invited_by_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        user_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
        ...timestamps,
      },
      { transaction },
    );
    await qi.createTable(
      'audit_events',
      {
        id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
        actor_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
        action: { type: DataTypes.STRING(60), allowNull: false },
        target_type: { type: DataTypes.STRING(40), allowNull: false },
        target_id: { type: DataTypes.STRING(40), allowNull: true },
        project_id: { type: DataTypes.INTEGER, allowNull: true },
        details: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
      },
      { transaction },
    );
    await qi.addIndex('audit_events', ['created_at'], { transaction });
    await qi.addIndex('audit_events', ['project_id'], { transaction });
    await qi.addIndex('audit_events', ['actor_id'], { transaction });
    await qi.createTable(
      'sign_in_attempts',
      {
        key: { type: DataTypes.STRING(300), primaryKey: true },
        failures: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        first_failure_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
        locked_until: { type: DataTypes.DATE, allowNull: true },
      },
      { transaction },
    );
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.dropTable('sign_in_attempts', { transaction });
    await qi.dropTable('audit_events', { transaction });
    await qi.dropTable('invitations', { transaction });
    await qi.dropTable('users', { transaction });
  });
}
