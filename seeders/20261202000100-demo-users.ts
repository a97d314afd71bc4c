// The invented workshop's four demo accounts (one per role). Change DEMO_PASSWORD in production.
import bcrypt from 'bcryptjs';
import { Op, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

export const DEMO_USERS = [
  { email: 'admin@anodyne.test', display_name: 'Mara Lindqvist', role: 'admin' },
  { email: 'designer@anodyne.test', display_name: 'Tomas Ferreira', role: 'designer' },
  { email: 'technician@anodyne.test', display_name: 'Ines Okafor', role: 'technician' },
  { email: 'reviewer@anodyne.test', display_name: 'Henrik Vale', role: 'reviewer' },
];

export async function up({ context: qi }: Ctx) {
  const hash = await bcrypt.hash(process.env.DEMO_PASSWORD ?? 'anodyne-demo', 10);
  const now = new Date();
  await qi.bulkInsert(
    'users',
    DEMO_USERS.map((u) => ({ ...u, password_hash: hash, active: true, created_at: now, updated_at: now })),
  );
}

export async function down({ context: qi }: Ctx) {
  await qi.bulkDelete('users', { email: { [Op.in]: DEMO_USERS.map((u) => u.email) } });
}
