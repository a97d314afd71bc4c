// Local stand-ins for the hosted services, for development and tests only:
// an SMTP sink that keeps every message it receives, and an S3-compatible object store.
// A small HTTP control port lists the received mail and can pause the SMTP listener
// (tests use that to prove that mail survives an SMTP outage through the outbox).
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
// eslint-disable-next-line @typescript-eslint/no-require-imports
const S3rver = require('s3rver');

const root = path.resolve(__dirname, '..');
const dataDir = process.env.FAKES_DIR ?? path.join(root, '.data');
const mailDir = path.join(dataDir, 'mail');
const s3Dir = path.join(dataDir, 's3');
const smtpPort = Number(process.env.SMTP_PORT ?? 2525);
const controlPort = Number(process.env.MAIL_SINK_PORT ?? 2580);
const s3Port = Number(process.env.S3_PORT ?? 4569);
mkdirSync(mailDir, { recursive: true });
mkdirSync(s3Dir, { recursive: true });

type StoredMail = {
  id: string;
  receivedAt: string;
  from: string;
  to: string[];
  subject: string;
  text: string;
  html: string;
  attachments: { filename: string; contentType: string; size: number; contentBase64: string }[];
};

function makeSmtp() {
  return new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const id = `${Date.now()}-${Math.random().toString(36).slice(2, 8)}`;
          const toField = Array.isArray(parsed.to) ? parsed.to : parsed.to ? [parsed.to] : [];
          const mail: StoredMail = {
            id,
            receivedAt: new Date().toISOString(),
            from: parsed.from?.text ?? '',
            to: toField.flatMap((a) => a.value.map((v) => v.address ?? '')).filter(Boolean),
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : '',
            attachments: parsed.attachments.map((a) => ({
              filename: a.filename ?? 'attachment',
              contentType: a.contentType,
              size: a.size,
              contentBase64: a.content.toString('base64'),
            })),
          };
          writeFileSync(path.join(mailDir, `${id}.json`), JSON.stringify(mail));
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
}

let smtp: SMTPServer | null = null;
function startSmtp(): Promise<void> {
  if (smtp) return Promise.resolve();
  smtp = makeSmtp();
  return new Promise((resolve) => smtp!.listen(smtpPort, '127.0.0.1', () => resolve()));
}
function stopSmtp(): Promise<void> {
  const s = smtp;
  smtp = null;
  return new Promise((resolve) => (s ? s.close(() => resolve()) : resolve()));
}

function listMail(): StoredMail[] {
  return readdirSync(mailDir)
    .filter((f) => f.endsWith('.json'))
    .sort()
    .map((f) => JSON.parse(readFileSync(path.join(mailDir, f), 'utf8')) as StoredMail);
}

function send(res: ServerResponse, status: number, body: unknown) {
  res.writeHead(status, { 'content-type': 'application/json' });
  res.end(JSON.stringify(body));
}

async function control(req: IncomingMessage, res: ServerResponse) {
  const url = new URL(req.url ?? '/', 'http://127.0.0.1');
  if (req.method === 'GET' && url.pathname === '/health') return send(res, 200, { smtp: smtp !== null });
  if (req.method === 'GET' && url.pathname === '/messages') {
    const full = url.searchParams.get('full') === '1';
    const mails = listMail().map((m) =>
      full ? m : { ...m, attachments: m.attachments.map(({ contentBase64: _c, ...rest }) => rest) },
    );
    return send(res, 200, { messages: mails });
  }
  if (req.method === 'DELETE' && url.pathname === '/messages') {
    for (const f of readdirSync(mailDir)) rmSync(path.join(mailDir, f));
    return send(res, 200, { cleared: true });
  }
  if (req.method === 'POST' && url.pathname === '/smtp/stop') {
    await stopSmtp();
    return send(res, 200, { smtp: false });
  }
  if (req.method === 'POST' && url.pathname === '/smtp/start') {
    await startSmtp();
    return send(res, 200, { smtp: true });
  }
  send(res, 404, { error: 'not found' });
}

async function main() {
  await startSmtp();
  const s3 = new S3rver({
    port: s3Port,
    address: '127.0.0.1',
    directory: s3Dir,
    silent: true,
    configureBuckets: [{ name: process.env.S3_BUCKET ?? 'anodyne' }, { name: 'anodyne-test' }],
  });
  await s3.run();
  createServer((req, res) => {
    control(req, res).catch((err: Error) => send(res, 500, { error: err.message }));
  }).listen(controlPort, '127.0.0.1');
  console.log(`[fakes] SMTP sink 127.0.0.1:${smtpPort}, mail list http://127.0.0.1:${controlPort}/messages, S3 http://127.0.0.1:${s3Port}`);
}

main().catch((err) => {
  console.error('[fakes] failed to start:', err);
  process.exit(1);
});
