import Link from 'next/link';
import { Caution } from '@/components/shell/caution';
import { Card, CardBody, CardHeader, PageHeader } from '@/components/ui/card';
import { requirePageUser } from '@/lib/auth/session';
import { adminHome, designerHome, reviewerHome, technicianHome, type HomeItem } from '@/lib/users/home';
import { cn } from '@/lib/utils';

const INTRO = {
  admin: { title: 'Workshop administration', lead: 'Keep the tube library and the team’s accounts in order.', list: 'Needs a look' },
  designer: { title: 'Your design work', lead: 'Pick up a project, or start a new stage design.', list: 'Projects' },
  technician: { title: 'At the bench', lead: 'Stages waiting for a bench check, or whose last check did not pass.', list: 'Stages to check' },
  reviewer: { title: 'Reviews', lead: 'Revisions submitted for sign-off.', list: 'Waiting for your decision' },
};

export default async function HomePage() {
  const user = await requirePageUser();
  const items: HomeItem[] =
    user.role === 'designer' ? await designerHome(user.id) : user.role === 'reviewer' ? await reviewerHome(user.id) : user.role === 'technician' ? await technicianHome() : await adminHome();
  const intro = INTRO[user.role];
  const firstName = user.displayName.split(' ')[0];
  return (
    <div className="space-y-5">
      <PageHeader title={`${intro.title}`} subtitle={`Good to see you, ${firstName}. ${intro.lead}`} />
      <Caution />
      <Card>
        <CardHeader title={intro.list} />
        <CardBody className="p-0">
          {items.length === 0 ? (
            <p className="p-4 text-sm text-muted">Nothing is waiting for you.</p>
          ) : (
            <ul className="divide-y divide-rule" data-testid="home-items">
              {items.map((i) => (
                <li key={i.href + i.title}>
                  <Link href={i.href} className="flex items-center justify-between gap-4 px-4 py-3 hover:bg-paper">
                    <span className="font-medium">{i.title}</span>
                    <span className={cn('text-sm', i.tone === 'over' ? 'text-over' : i.tone === 'near' ? 'text-near' : 'text-muted')}>{i.detail}</span>
                  </Link>
                </li>
              ))}
            </ul>
          )}
        </CardBody>
      </Card>
    </div>
  );
}
