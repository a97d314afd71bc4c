'use client';

import { signOut } from 'next-auth/react';
import { useTheme } from 'next-themes';
import { useEffect, useState } from 'react';
import { Button } from '@/components/ui/button';

export function ThemeToggle() {
  const { resolvedTheme, setTheme } = useTheme();
  const [mounted, setMounted] = useState(false);
  useEffect(() => setMounted(true), []);
  const dark = mounted && resolvedTheme === 'dark';
  return (
    <Button variant="ghost" size="sm" aria-label={dark ? 'Switch to light theme' : 'Switch to dark theme'} onClick={() => setTheme(dark ? 'light' : 'dark')}>
      {mounted ? (dark ? '☀ Light' : '☾ Dark') : '◐ Theme'}
    </Button>
  );
}

export function UserMenu({ name, role }: { name: string; role: string }) {
  return (
    <div className="flex items-center gap-2">
      <ThemeToggle />
      <div className="text-right leading-tight">
        <div className="text-sm font-medium" data-testid="user-name">{name}</div>
        <div className="text-[11px] text-muted" data-testid="user-role">{role}</div>
      </div>
      <Button variant="secondary" size="sm" onClick={() => signOut({ callbackUrl: '/sign-in' })}>
        Sign out
      </Button>
    </div>
  );
}
