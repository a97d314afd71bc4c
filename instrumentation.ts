// Drains the mail outbox in the background of every app server (SKIP LOCKED keeps them from colliding).
export async function register() {
  if (process.env.NEXT_RUNTIME !== 'nodejs') return;
  // sign-in limits need the TCP peer address (lib/auth/client-address.ts)
  (await import('@/lib/auth/peer-header')).installPeerHeader();
  if (process.env.OUTBOX_WORKER === 'off') return;
  const { deliverDueMail } = await import('@/lib/mail/outbox');
  const every = Number(process.env.OUTBOX_INTERVAL_MS ?? 3000);
  setInterval(() => {
    deliverDueMail().catch((err) => console.error('[mail] outbox run failed', err instanceof Error ? err.message : err));
  }, every).unref();
}
