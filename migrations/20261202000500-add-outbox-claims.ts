import { DataTypes, type QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

// A delivery attempt claims its row until claimed_until, so a second worker (or a forced retry) cannot send the
// same mail while the first attempt is still talking to the SMTP server.
export async function up({ context: qi }: Ctx) {
  await qi.addColumn('mail_outbox', 'claimed_until', { type: DataTypes.DATE, allowNull: true });
}

export async function down({ context: qi }: Ctx) {
  await qi.removeColumn('mail_outbox', 'claimed_until');
}
