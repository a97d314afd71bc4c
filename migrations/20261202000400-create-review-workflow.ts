import { DataTypes, fn, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const userRef = { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' };

export async function up({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.createTable(
      'bench_checks',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        stage_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'stages', key: 'id' }, onDelete: 'CASCADE' },
        project_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'projects', key: 'id' }, onDelete: 'CASCADE' },
        technician_id: userRef,
        readings: { type: DataTypes.JSONB, allowNull: false },
        comparisons: { type: DataTypes.JSONB, allowNull: false },
        verdict: { type: DataTypes.STRING(10), allowNull: false },
        tube_serial: { type: DataTypes.STRING(80), allowNull: false, defaultValue: '' },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
      },
      { transaction },
    );
    await qi.sequelize.query(
      `ALTER TABLE bench_checks ADD CONSTRAINT bench_checks_verdict_check CHECK (verdict IN ('pass','check','fail'))`,
      { transaction },
    );
    await qi.addIndex('bench_checks', ['project_id', 'created_at'], { transaction });
    await qi.addIndex('bench_checks', ['stage_id', 'created_at'], { transaction });
    await qi.createTable(
      'revisions',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        project_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'projects', key: 'id' }, onDelete: 'RESTRICT' },
        number: { type: DataTypes.INTEGER, allowNull: false },
        snapshot: { type: DataTypes.JSONB, allowNull: false },
        content_hash: { type: DataTypes.STRING(64), allowNull: false },
        state: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'submitted' },
        submitted_by_id: userRef,
        submitted_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
        decided_at: { type: DataTypes.DATE, allowNull: true },
      },
      { transaction },
    );
    await qi.addIndex('revisions', ['project_id', 'number'], { unique: true, transaction });
    await qi.sequelize.query(
      `ALTER TABLE revisions ADD CONSTRAINT revisions_state_check CHECK (state IN ('submitted','approved','changes-requested'));
       -- A revision's content is frozen from the moment it is submitted; once approved, nothing about it may change
       -- and it cannot be deleted. Enforced here so that no code path (or hand-written SQL) can get round it.
       CREATE FUNCTION revisions_guard() RETURNS trigger LANGUAGE plpgsql AS $$
       BEGIN
         IF TG_OP = 'DELETE' THEN
           IF OLD.state = 'approved' THEN
             RAISE EXCEPTION 'approved revision % is immutable', OLD.id USING ERRCODE = 'check_violation';
           END IF;
           RETURN OLD;
         END IF;
         IF OLD.state = 'approved' THEN
           RAISE EXCEPTION 'approved revision % is immutable', OLD.id USING ERRCODE = 'check_violation';
         END IF;
         IF NEW.snapshot IS DISTINCT FROM OLD.snapshot OR NEW.content_hash IS DISTINCT FROM OLD.content_hash
            OR NEW.project_id IS DISTINCT FROM OLD.project_id OR NEW.number IS DISTINCT FROM OLD.number
            OR NEW.submitted_by_id IS DISTINCT FROM OLD.submitted_by_id THEN
           RAISE EXCEPTION 'revision % content is frozen', OLD.id USING ERRCODE = 'check_violation';
         END IF;
         RETURN NEW;
       END $$;
       CREATE TRIGGER revisions_guard BEFORE UPDATE OR DELETE ON revisions
         FOR EACH ROW EXECUTE FUNCTION revisions_guard();`,
      { transaction },
    );
    await qi.createTable(
      'decisions',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        revision_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'revisions', key: 'id' }, onDelete: 'RESTRICT' },
        reviewer_id: userRef,
        decision: { type: DataTypes.STRING(20), allowNull: false },
        comment: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
      },
      { transaction },
    );
    await qi.sequelize.query(
      `ALTER TABLE decisions ADD CONSTRAINT decisions_decision_check CHECK (decision IN ('approve','request-changes'));
       CREATE UNIQUE INDEX decisions_one_per_revision ON decisions (revision_id);
       CREATE FUNCTION decisions_guard() RETURNS trigger LANGUAGE plpgsql AS $$
       BEGIN
         RAISE EXCEPTION 'decisions are permanent' USING ERRCODE = 'check_violation';
       END $$;
       CREATE TRIGGER decisions_guard BEFORE UPDATE OR DELETE ON decisions
         FOR EACH ROW EXECUTE FUNCTION decisions_guard();`,
      { transaction },
    );
    await qi.createTable(
      'mail_outbox',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        to: { type: DataTypes.ARRAY(DataTypes.STRING(254)), allowNull: false },
        subject: { type: DataTypes.STRING(300), allowNull: false },
        html: { type: DataTypes.TEXT, allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: false },
        attachments: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'queued' },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        last_error: { type: DataTypes.TEXT, allowNull: true },
        next_attempt_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
        sent_at: { type: DataTypes.DATE, allowNull: true },
        created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
        updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
      },
      { transaction },
    );
    await qi.sequelize.query(
      `ALTER TABLE mail_outbox ADD CONSTRAINT mail_outbox_status_check CHECK (status IN ('queued','sent','failed'))`,
      { transaction },
    );
    await qi.addIndex('mail_outbox', ['status', 'next_attempt_at'], { transaction });
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.dropTable('mail_outbox', { transaction });
    await qi.sequelize.query('DROP TRIGGER IF EXISTS decisions_guard ON decisions; DROP FUNCTION IF EXISTS decisions_guard();', { transaction });
    await qi.dropTable('decisions', { transaction });
    await qi.sequelize.query('DROP TRIGGER IF EXISTS revisions_guard ON revisions; DROP FUNCTION IF EXISTS revisions_guard();', { transaction });
    await qi.dropTable('revisions', { transaction });
    await qi.dropTable('bench_checks', { transaction });
  });
}
