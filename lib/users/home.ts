import 'server-only';
import { QueryTypes } from 'sequelize';
import { sequelize } from '@/lib/db';

type Row = Record<string, unknown>;
const q = <T extends Row>(sql: string, replacements: Record<string, unknown> = {}) =>
  sequelize.query<T>(sql, { type: QueryTypes.SELECT, replacements });

export type HomeItem = { href: string; title: string; detail: string; tone?: 'over' | 'near' | 'info' };

export async function designerHome(userId: number): Promise<HomeItem[]> {
  const rows = await q<{ id: number; name: string; status: string; over: number; stages: number }>(
    `SELECT p.id, p.name, p.status, COUNT(s.id)::int AS stages,
            COUNT(s.id) FILTER (WHERE s.analysis IS NOT NULL AND EXISTS (
              SELECT 1 FROM jsonb_array_elements(COALESCE(s.analysis->'ratings', '[]'::jsonb)) r WHERE r->>'status' = 'over'))::int AS over
       FROM projects p LEFT JOIN stages s ON s.project_id = p.id
      WHERE NOT p.archived AND (p.owner_id = :userId OR :userId IS NOT NULL)
      GROUP BY p.id ORDER BY (p.owner_id = :userId) DESC, p.updated_at DESC LIMIT 12`,
    { userId },
  );
  return rows.map((r) => ({
    href: `/projects/${r.id}`,
    title: r.name,
    detail: r.over > 0 ? `${r.over} stage${r.over === 1 ? '' : 's'} over a rating` : r.status === 'changes-requested' ? 'Changes requested by the reviewer' : `${r.stages} stage${r.stages === 1 ? '' : 's'} · ${r.status.replace('-', ' ')}`,
    tone: r.over > 0 ? 'over' : r.status === 'changes-requested' ? 'near' : undefined,
  }));
}

export async function reviewerHome(userId: number): Promise<HomeItem[]> {
  const rows = await q<{ id: number; number: number; name: string; submitter: string | null; submitted_by_id: number | null }>(
    `SELECT r.id, r.number, p.name, u.display_name AS submitter, r.submitted_by_id
       FROM revisions r JOIN projects p ON p.id = r.project_id LEFT JOIN users u ON u.id = r.submitted_by_id
      WHERE r.state = 'submitted' ORDER BY r.submitted_at ASC`,
  );
  return rows.map((r) => ({
    href: `/reviews/${r.id}`,
    title: `${r.name} · revision ${r.number}`,
    detail: r.submitted_by_id === userId ? 'Submitted by you: another reviewer must decide' : `Waiting for a decision · submitted by ${r.submitter ?? 'unknown'}`,
    tone: 'info',
  }));
}

export async function technicianHome(): Promise<HomeItem[]> {
  const rows = await q<{ stage_id: number; project_id: number; stage: string; project: string; verdict: string | null }>(
    `SELECT s.id AS stage_id, p.id AS project_id, s.name AS stage, p.name AS project,
            (SELECT b.verdict FROM bench_checks b WHERE b.stage_id = s.id ORDER BY b.created_at DESC LIMIT 1) AS verdict
       FROM stages s JOIN projects p ON p.id = s.project_id
      WHERE NOT p.archived ORDER BY p.name, s.position`,
  );
  return rows
    .filter((r) => r.verdict !== 'pass')
    .map((r) => ({
      href: `/bench?stage=${r.stage_id}`,
      title: `${r.project} · ${r.stage}`,
      detail: r.verdict ? `Last bench check: ${r.verdict}` : 'Not yet checked at the bench',
      tone: r.verdict === 'fail' ? 'over' : r.verdict === 'check' ? 'near' : undefined,
    }));
}

export async function adminHome(): Promise<HomeItem[]> {
  const [counts] = await q<{ pending: number; failed: number; queued: number; users: number }>(
    `SELECT (SELECT COUNT(*) FROM users WHERE password_hash IS NULL)::int AS pending,
            (SELECT COUNT(*) FROM mail_outbox WHERE status = 'failed')::int AS failed,
            (SELECT COUNT(*) FROM mail_outbox WHERE status = 'queued')::int AS queued,
            (SELECT COUNT(*) FROM users WHERE active)::int AS users`,
  );
  const items: HomeItem[] = [{ href: '/admin/users', title: 'Users', detail: `${counts?.users ?? 0} active · ${counts?.pending ?? 0} invitation(s) not yet accepted` }];
  if (counts?.failed || counts?.queued) {
    items.push({ href: '/admin/outbox', title: 'Outbox', detail: `${counts.failed} failed, ${counts.queued} queued mail`, tone: counts.failed ? 'over' : 'info' });
  }
  items.push({ href: '/tubes', title: 'Tube library', detail: 'Types, ratings, published models and measured curve sets' });
  return items;
}
