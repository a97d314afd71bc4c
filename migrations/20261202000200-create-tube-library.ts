import { DataTypes, fn, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
  updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: fn('now') },
};
const userRef = { type: DataTypes.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' };

export async function up({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.createTable(
      'tube_types',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        designation: { type: DataTypes.STRING(60), allowNull: false, unique: true },
        aliases: { type: DataTypes.ARRAY(DataTypes.STRING(60)), allowNull: false, defaultValue: [] },
        family: { type: DataTypes.STRING(20), allowNull: false },
        sections: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        heater: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        ratings: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        capacitances: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        typical_points: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        published: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        retired: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        created_by_id: userRef,
        ...timestamps,
      },
      { transaction },
    );
    await qi.sequelize.query(
      `ALTER TABLE tube_types ADD CONSTRAINT tube_types_family_check CHECK (family IN ('triode','pentode','beam-tetrode'))`,
      { transaction },
    );
    await qi.createTable(
      'curve_sets',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        tube_type_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'tube_types', key: 'id' }, onDelete: 'CASCADE' },
        name: { type: DataTypes.STRING(120), allowNull: false },
        kind: { type: DataTypes.STRING(20), allowNull: false },
        current_unit: { type: DataTypes.STRING(4), allowNull: false },
        file_name: { type: DataTypes.STRING(200), allowNull: false },
        object_key: { type: DataTypes.STRING(300), allowNull: false },
        byte_size: { type: DataTypes.INTEGER, allowNull: false },
        point_count: { type: DataTypes.INTEGER, allowNull: false },
        demo: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        uploaded_by_id: userRef,
        ...timestamps,
      },
      { transaction },
    );
    await qi.createTable(
      'curve_points',
      {
        id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
        curve_set_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'curve_sets', key: 'id' }, onDelete: 'CASCADE' },
        grid_voltage: { type: DataTypes.DOUBLE, allowNull: false },
        plate_voltage: { type: DataTypes.DOUBLE, allowNull: false },
        plate_current: { type: DataTypes.DOUBLE, allowNull: false },
        screen_voltage: { type: DataTypes.DOUBLE, allowNull: true },
        screen_current: { type: DataTypes.DOUBLE, allowNull: true },
      },
      { transaction },
    );
    await qi.addIndex('curve_points', ['curve_set_id'], { transaction });
    await qi.createTable(
      'curve_fits',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        curve_set_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'curve_sets', key: 'id' }, onDelete: 'CASCADE' },
        model: { type: DataTypes.STRING(30), allowNull: false },
        parameters: { type: DataTypes.JSONB, allowNull: false },
        rms_error_percent: { type: DataTypes.DOUBLE, allowNull: false },
        max_error_percent: { type: DataTypes.DOUBLE, allowNull: false },
        status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'proposed' },
        created_by_id: userRef,
        ...timestamps,
      },
      { transaction },
    );
    await qi.createTable(
      'tube_models',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        tube_type_id: { type: DataTypes.INTEGER, allowNull: false, references: { model: 'tube_types', key: 'id' }, onDelete: 'CASCADE' },
        name: { type: DataTypes.STRING(120), allowNull: false },
        kind: { type: DataTypes.STRING(30), allowNull: false },
        parameters: { type: DataTypes.JSONB, allowNull: false },
        source: { type: DataTypes.TEXT, allowNull: false },
        is_default: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        published: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        curve_fit_id: { type: DataTypes.INTEGER, allowNull: true, references: { model: 'curve_fits', key: 'id' }, onDelete: 'SET NULL' },
        created_by_id: userRef,
        ...timestamps,
      },
      { transaction },
    );
    await qi.addIndex('tube_models', ['tube_type_id'], { transaction });
    await qi.sequelize.query(
      `CREATE UNIQUE INDEX tube_models_one_default ON tube_models (tube_type_id) WHERE is_default`,
      { transaction },
    );
    await qi.createTable(
      'attachments',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        owner_type: { type: DataTypes.STRING(30), allowNull: false },
        owner_id: { type: DataTypes.INTEGER, allowNull: false },
        kind: { type: DataTypes.STRING(20), allowNull: false },
        file_name: { type: DataTypes.STRING(200), allowNull: false },
        content_type: { type: DataTypes.STRING(100), allowNull: false },
        byte_size: { type: DataTypes.INTEGER, allowNull: false },
        object_key: { type: DataTypes.STRING(300), allowNull: false },
        uploaded_by_id: userRef,
        ...timestamps,
      },
      { transaction },
    );
    await qi.addIndex('attachments', ['owner_type', 'owner_id'], { transaction });
  });
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.dropTable('attachments', { transaction });
    await qi.dropTable('tube_models', { transaction });
    await qi.dropTable('curve_fits', { transaction });
    await qi.dropTable('curve_points', { transaction });
    await qi.dropTable('curve_sets', { transaction });
    await qi.dropTable('tube_types', { transaction });
  });
}
