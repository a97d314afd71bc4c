import type { QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

// How a project's stages are joined in its signal chain: [{ from, output, to, input, coupling }] with stage ids.
// NULL keeps the default: capacitor coupling from each stage to the next in stage order.
export async function up({ context: qi }: Ctx) {
  await qi.sequelize.query(`ALTER TABLE projects ADD COLUMN chain_links jsonb`);
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.query('ALTER TABLE projects DROP COLUMN chain_links');
}
