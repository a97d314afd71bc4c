'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ColumnDef } from '@tanstack/react-table';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Badge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { DataTable } from '@/components/ui/data-table';
import { Field } from '@/components/ui/field';
import { Input, Select } from '@/components/ui/input';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { inviteSchema, type InviteInput } from '@/lib/validation/auth';
import { ROLE_LABELS, ROLE_VALUES } from '@/lib/validation/roles';

type UserRow = { id: number; email: string; displayName: string; role: (typeof ROLE_VALUES)[number]; active: boolean; createdAt: string; pendingInvitation: boolean };

export function UsersAdmin({ initialUsers, meId }: { initialUsers: UserRow[]; meId: number }) {
  const qc = useQueryClient();
  const users = useQuery({ queryKey: ['admin', 'users'], queryFn: () => fetchJson<{ users: UserRow[] }>('/api/admin/users').then((r) => r.users), initialData: initialUsers });
  const [notice, setNotice] = useState<{ tone: 'ok' | 'over'; text: string } | null>(null);
  const update = useMutation({
    mutationFn: (v: { id: number; patch: Partial<Pick<UserRow, 'role' | 'active'>> }) => fetchJson(`/api/admin/users/${v.id}`, { method: 'PATCH', body: v.patch }),
    onSuccess: () => qc.invalidateQueries({ queryKey: ['admin', 'users'] }),
    onError: (err) => setNotice({ tone: 'over', text: err.message }),
  });

  const columns: ColumnDef<UserRow, unknown>[] = [
    { accessorKey: 'displayName', header: 'Name' },
    { accessorKey: 'email', header: 'E-mail', cell: (c) => <span className="num text-xs">{c.row.original.email}</span> },
    {
      accessorKey: 'role',
      header: 'Role',
      cell: ({ row }) => (
        <Select
          aria-label={`Role of ${row.original.email}`}
          className="h-8 w-36"
          value={row.original.role}
          disabled={row.original.id === meId || update.isPending}
          onChange={(e) => update.mutate({ id: row.original.id, patch: { role: e.target.value as UserRow['role'] } })}
        >
          {ROLE_VALUES.map((r) => (
            <option key={r} value={r}>{ROLE_LABELS[r]}</option>
          ))}
        </Select>
      ),
    },
    {
      id: 'status',
      header: 'Status',
      accessorFn: (u) => (!u.active ? 'deactivated' : u.pendingInvitation ? 'invited' : 'active'),
      cell: ({ getValue }) => {
        const v = getValue() as string;
        return <Badge tone={v === 'active' ? 'ok' : v === 'invited' ? 'info' : 'over'}>{v}</Badge>;
      },
    },
    {
      id: 'actions',
      header: '',
      enableSorting: false,
      cell: ({ row }) =>
        row.original.id === meId ? (
          <span className="text-xs text-muted">you</span>
        ) : (
          <Button
            size="sm"
            variant={row.original.active ? 'danger' : 'secondary'}
            disabled={update.isPending}
            onClick={() => update.mutate({ id: row.original.id, patch: { active: !row.original.active } })}
          >
            {row.original.active ? 'Deactivate' : 'Reactivate'}
          </Button>
        ),
    },
  ];

  return (
    <div className="grid gap-5 lg:grid-cols-[1fr_320px]">
      <div className="space-y-3">
        {notice ? <p role="status" className={notice.tone === 'ok' ? 'text-sm text-ok' : 'text-sm text-over'}>{notice.text}</p> : null}
        <DataTable data={users.data} columns={columns} filterPlaceholder="Filter by name, e-mail, role, status…" testId="users-table" initialSort={[{ id: 'displayName', desc: false }]} />
      </div>
      <InviteForm onInvited={(email) => { setNotice({ tone: 'ok', text: `Invitation sent to ${email}.` }); qc.invalidateQueries({ queryKey: ['admin', 'users'] }); }} />
    </div>
  );
}

function InviteForm({ onInvited }: { onInvited: (email: string) => void }) {
  const form = useForm<InviteInput>({ resolver: zodResolver(inviteSchema), defaultValues: { email: '', displayName: '', role: 'designer' } });
  const { errors, isSubmitting } = form.formState;
  const [error, setError] = useState<string | null>(null);
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      await fetchJson('/api/admin/invitations', { method: 'POST', body: values });
      form.reset({ email: '', displayName: '', role: values.role });
      onInvited(values.email);
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors) {
        for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k as keyof InviteInput, { message: v[0] });
      }
      setError(err instanceof Error ? err.message : 'Invitation failed.');
    }
  });
  return (
    <Card className="h-fit">
      <CardHeader title="Invite someone" />
      <CardBody>
        <form onSubmit={onSubmit} className="space-y-3" noValidate>
          <Field label="Name" htmlFor="invite-name" error={errors.displayName?.message}>
            <Input id="invite-name" {...form.register('displayName')} />
          </Field>
          <Field label="E-mail" htmlFor="invite-email" error={errors.email?.message}>
            <Input id="invite-email" type="email" {...form.register('email')} />
          </Field>
          <Field label="Role" htmlFor="invite-role" error={errors.role?.message}>
            <Select id="invite-role" {...form.register('role')}>
              {ROLE_VALUES.map((r) => (
                <option key={r} value={r}>{ROLE_LABELS[r]}</option>
              ))}
            </Select>
          </Field>
          {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
          <Button type="submit" disabled={isSubmitting} className="w-full">Send invitation</Button>
          <p className="text-xs text-muted">The link sets a password once and expires after 48 hours.</p>
        </form>
      </CardBody>
    </Card>
  );
}
