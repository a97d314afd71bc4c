import type { Metadata } from 'next';
import { pageId } from '@/lib/validation/ids';
import { BenchWorkbench } from '@/components/bench/bench-workbench';
import { Caution } from '@/components/shell/caution';
import { PageHeader } from '@/components/ui/card';
import { ApiError } from '@/lib/api/errors';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';
import { benchContext, benchPickerOptions, listBenchChecks } from '@/lib/bench/service';

export const metadata: Metadata = { title: 'Bench' };
export const dynamic = 'force-dynamic';

export default async function BenchPage({ searchParams }: { searchParams: Promise<{ stage?: string }> }) {
  const user = await requirePageUser('bench:write');
  const { stage } = await searchParams;
  const stageId = pageId(stage);
  const projects = await benchPickerOptions();
  let initial = null;
  if (stageId) {
    try {
      const [context, checks] = await Promise.all([benchContext(stageId), listBenchChecks({ stageId })]);
      initial = { context, checks };
    } catch (err) {
      if (!(err instanceof ApiError && err.code === 'not_found')) throw err;
    }
  }
  return (
    <div className="space-y-5">
      <PageHeader title="Bench" subtitle="Record what the meter reads on a built stage; Anodyne works out the plate current and dissipation and compares them with the design and the tube’s ratings." />
      <Caution />
      {stageId && !initial ? <p role="alert" className="text-sm text-over">There is no stage {stageId}. Choose one below.</p> : null}
      <BenchWorkbench projects={projects} stageId={initial ? stageId : null} initial={initial} canRecord={can(user.role, 'bench:write')} />
    </div>
  );
}
