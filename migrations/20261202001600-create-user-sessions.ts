import type { QueryInterface } from 'sequelize';

type Ctx = { context: QueryInterface };

// One row per sign-in. The session token names its row; signing out (or an admin deactivating the account)
// revokes it, and every request checks it, so a copied token stops working at once.
export async function up({ context: qi }: Ctx) {
  await qi.sequelize.query(`
    CREATE TABLE user_sessions (
      id uuid PRIMARY KEY,
      user_id integer NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      created_at timestamptz NOT NULL DEFAULT now(),
      expires_at timestamptz NOT NULL,
      revoked_at timestamptz
    );
    CREATE INDEX user_sessions_user_id ON user_sessions (user_id);
  `);
}

export async function down({ context: qi }: Ctx) {
  await qi.sequelize.query('DROP TABLE user_sessions');
}
