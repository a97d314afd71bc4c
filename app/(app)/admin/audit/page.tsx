import type { Metadata } from 'next';
import { Button } from '@/components/ui/button';
import { Card, PageHeader } from '@/components/ui/card';
import { Input, Select } from '@/components/ui/input';
import { requirePageUser } from '@/lib/auth/session';
import { auditFilterOptions, auditQuerySchema, listAudit } from '@/lib/audit/log';
import { formatDateTime } from '@/lib/utils';

export const metadata: Metadata = { title: 'Audit log' };

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | undefined>> }) {
  await requirePageUser('audit:read-all');
  const sp = await searchParams;
  const parsed = auditQuerySchema.safeParse({ projectId: sp.projectId || undefined, userId: sp.userId || undefined, action: sp.action || undefined });
  const filter = parsed.success ? parsed.data : auditQuerySchema.parse({});
  const [events, options] = await Promise.all([listAudit(filter, 'all'), auditFilterOptions()]);
  return (
    <div className="space-y-4">
      <PageHeader title="Audit log" subtitle="Every change that matters, with who made it and when. Newest first." />
      <form className="flex flex-wrap items-end gap-2" method="get">
        <label className="text-xs text-muted">Project
          <Select name="projectId" defaultValue={String(filter.projectId ?? '')} className="mt-1 w-56">
            <option value="">All projects</option>
            {options.projects.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
          </Select>
        </label>
        <label className="text-xs text-muted">User
          <Select name="userId" defaultValue={String(filter.userId ?? '')} className="mt-1 w-48">
            <option value="">Everyone</option>
            {options.users.map((u) => <option key={u.id} value={u.id}>{u.name}</option>)}
          </Select>
        </label>
        <label className="text-xs text-muted">Action starts with
          <Input name="action" defaultValue={filter.action ?? ''} placeholder="e.g. revision." className="mt-1 w-44" />
        </label>
        <Button type="submit" variant="secondary">Filter</Button>
      </form>
      <Card className="overflow-x-auto">
        <table className="w-full text-sm" data-testid="audit-table">
          <thead className="border-b border-rule text-left text-xs text-muted">
            <tr><th className="px-3 py-2">When</th><th className="px-3 py-2">Who</th><th className="px-3 py-2">Action</th><th className="px-3 py-2">Target</th><th className="px-3 py-2">Project</th><th className="px-3 py-2">Details</th></tr>
          </thead>
          <tbody className="divide-y divide-rule">
            {events.map((e) => (
              <tr key={e.id}>
                <td className="whitespace-nowrap px-3 py-2 text-xs text-muted">{formatDateTime(e.createdAt)}</td>
                <td className="px-3 py-2">{e.actor ?? '—'}</td>
                <td className="num px-3 py-2 text-xs">{e.action}</td>
                <td className="px-3 py-2 text-xs">{e.targetType} {e.targetId ? `#${e.targetId}` : ''}</td>
                <td className="px-3 py-2 text-xs">{e.project ?? '—'}</td>
                <td className="num max-w-md truncate px-3 py-2 text-[11px] text-muted" title={JSON.stringify(e.details)}>{JSON.stringify(e.details)}</td>
              </tr>
            ))}
            {events.length === 0 ? <tr><td colSpan={6} className="px-3 py-6 text-center text-muted">No events match.</td></tr> : null}
          </tbody>
        </table>
      </Card>
    </div>
  );
}
