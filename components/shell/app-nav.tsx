'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';
import { cn } from '@/lib/utils';
import type { NavItem } from './nav-items';

export function AppNav({ items }: { items: NavItem[] }) {
  const pathname = usePathname();
  const main = items.filter((i) => !i.group);
  const admin = items.filter((i) => i.group === 'admin');
  const link = (i: NavItem) => {
    const active = pathname === i.href || pathname.startsWith(`${i.href}/`);
    return (
      <Link
        key={i.href}
        href={i.href}
        aria-current={active ? 'page' : undefined}
        className={cn('rounded px-2.5 py-1.5 text-sm transition-colors hover:bg-rule/40', active ? 'bg-rule/50 font-semibold text-ink' : 'text-muted')}
      >
        {i.label}
      </Link>
    );
  };
  return (
    <nav aria-label="Main" className="flex flex-wrap items-center gap-1">
      {main.map(link)}
      {admin.length ? (
        <>
          <span aria-hidden className="mx-1.5 h-4 w-px bg-rule" />
          <span className="mr-0.5 text-[11px] font-semibold text-muted">Admin</span>
          {admin.map(link)}
        </>
      ) : null}
    </nav>
  );
}
