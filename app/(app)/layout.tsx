import Link from 'next/link';
import { AppNav } from '@/components/shell/app-nav';
import { Logo } from '@/components/shell/logo';
import { NAV_ITEMS } from '@/components/shell/nav-items';
import { UserMenu } from '@/components/shell/user-menu';
import { can } from '@/lib/auth/policy';
import { requirePageUser } from '@/lib/auth/session';

export default async function AppLayout({ children }: { children: React.ReactNode }) {
  const user = await requirePageUser();
  const items = NAV_ITEMS.filter((i) => can(user.role, i.permission));
  return (
    <div className="min-h-screen">
      <header className="sticky top-0 z-30 border-b border-rule bg-sheet/95 backdrop-blur">
        <div className="mx-auto flex max-w-[1600px] flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
          <Link href="/" aria-label="Anodyne home" className="text-ink">
            <Logo />
          </Link>
          <AppNav items={items} />
          <div className="ml-auto">
            <UserMenu name={user.displayName} role={user.role} />
          </div>
        </div>
      </header>
      <main className="mx-auto max-w-[1600px] px-4 py-6">{children}</main>
    </div>
  );
}
