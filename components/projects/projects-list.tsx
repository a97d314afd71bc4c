'use client';

import { zodResolver } from '@hookform/resolvers/zod';
import { useQuery } from '@tanstack/react-query';
import type { ColumnDef } from '@tanstack/react-table';
import Link from 'next/link';
import { useRouter } from 'next/navigation';
import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { Badge, StatusBadge } from '@/components/ui/badge';
import { Button } from '@/components/ui/button';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { DataTable } from '@/components/ui/data-table';
import { Field } from '@/components/ui/field';
import { Input, Select, Textarea } from '@/components/ui/input';
import type { ProjectDetail, ProjectListRow } from '@/lib/projects/service';
import { ApiRequestError, fetchJson } from '@/lib/hooks/fetch-json';
import { createProjectSchema, PROJECT_STATUSES, type CreateProjectInput } from '@/lib/validation/project';

const STATUS_WORDS: Record<string, string> = { draft: 'Draft', 'in-review': 'In review', approved: 'Approved', 'changes-requested': 'Changes requested' };

function when(iso: string) {
  const d = new Date(iso);
  return d.toLocaleString('en-GB', { day: '2-digit', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZone: 'UTC' }) + ' UTC';
}

export function ProjectsList({ initialProjects, canWrite }: { initialProjects: ProjectListRow[]; canWrite: boolean }) {
  const projects = useQuery({
    queryKey: ['projects', 'all'],
    queryFn: () => fetchJson<{ projects: ProjectListRow[] }>('/api/projects?archived=all').then((r) => r.projects),
    initialData: initialProjects,
  });
  const [status, setStatus] = useState('');
  const [showArchived, setShowArchived] = useState(false);
  const rows = useMemo(
    () => projects.data.filter((p) => (showArchived || !p.archived) && (!status || p.status === status)),
    [projects.data, showArchived, status],
  );

  const columns: ColumnDef<ProjectListRow, unknown>[] = [
    {
      accessorKey: 'name',
      header: 'Name',
      cell: ({ row }) => (
        <span className="flex items-center gap-2">
          <Link href={`/projects/${row.original.id}`} className="font-medium text-ink underline-offset-2 hover:underline">
            {row.original.name}
          </Link>
          {row.original.archived ? <Badge>archived</Badge> : null}
        </span>
      ),
    },
    { accessorKey: 'status', header: 'Status', cell: ({ row }) => <StatusBadge status={row.original.status} /> },
    { id: 'owner', accessorFn: (p) => p.owner?.displayName ?? '–', header: 'Owner' },
    { accessorKey: 'updatedAt', header: 'Last change', cell: ({ row }) => <span className="num text-xs">{when(row.original.updatedAt)}</span> },
    { accessorKey: 'stageCount', header: 'Stages', cell: ({ row }) => <span className="num">{row.original.stageCount}</span> },
    {
      accessorKey: 'ratingProblems',
      header: 'Ratings',
      cell: ({ row }) =>
        row.original.ratingProblems > 0 ? (
          <Badge tone="over">{row.original.ratingProblems} stage{row.original.ratingProblems === 1 ? '' : 's'} over or failing</Badge>
        ) : row.original.stageCount ? (
          <Badge tone="ok">all within</Badge>
        ) : (
          <span className="text-xs text-muted">no stages</span>
        ),
    },
  ];

  return (
    <div className={canWrite ? 'grid gap-5 lg:grid-cols-[1fr_320px]' : ''}>
      <DataTable
        data={rows}
        columns={columns}
        testId="projects-table"
        filterPlaceholder="Filter by name, owner…"
        initialSort={[{ id: 'updatedAt', desc: true }]}
        toolbar={
          <>
            <Select aria-label="Status" className="h-9 w-44" value={status} onChange={(e) => setStatus(e.target.value)}>
              <option value="">Any status</option>
              {PROJECT_STATUSES.map((s) => (
                <option key={s} value={s}>{STATUS_WORDS[s]}</option>
              ))}
            </Select>
            <label className="flex items-center gap-1.5 text-sm text-muted">
              <input type="checkbox" checked={showArchived} onChange={(e) => setShowArchived(e.target.checked)} className="accent-heater" />
              Show archived
            </label>
          </>
        }
      />
      {canWrite ? <CreateProjectForm /> : null}
    </div>
  );
}

function CreateProjectForm() {
  const router = useRouter();
  const form = useForm<CreateProjectInput>({ resolver: zodResolver(createProjectSchema), defaultValues: { name: '', description: '' } });
  const { errors, isSubmitting } = form.formState;
  const [error, setError] = useState<string | null>(null);
  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      const { project } = await fetchJson<{ project: ProjectDetail }>('/api/projects', { method: 'POST', body: values });
      router.push(`/projects/${project.id}`);
    } catch (err) {
      if (err instanceof ApiRequestError && err.fieldErrors) {
        for (const [k, v] of Object.entries(err.fieldErrors)) form.setError(k as keyof CreateProjectInput, { message: v[0] });
      }
      setError(err instanceof Error ? err.message : 'Could not create the project.');
    }
  });
  return (
    <Card className="h-fit">
      <CardHeader title="New project" />
      <CardBody>
        <form onSubmit={onSubmit} className="space-y-3" noValidate>
          <Field label="Name" htmlFor="project-name" error={errors.name?.message}>
            <Input id="project-name" aria-invalid={Boolean(errors.name)} {...form.register('name')} />
          </Field>
          <Field label="Description" htmlFor="project-description" error={errors.description?.message} hint="What it is for; the supply and stages come next.">
            <Textarea id="project-description" {...form.register('description')} />
          </Field>
          {error ? <p role="alert" className="text-sm text-over">{error}</p> : null}
          <Button type="submit" disabled={isSubmitting} className="w-full">Create project</Button>
        </form>
      </CardBody>
    </Card>
  );
}
