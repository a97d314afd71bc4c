import { Logo } from '@/components/shell/logo';

export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <main className="flex min-h-screen flex-col items-center justify-center px-4 py-10">
      <Logo className="mb-6 text-ink" />
      <div className="w-full max-w-sm">{children}</div>
      <p className="mt-8 max-w-sm text-center text-xs text-muted">
        Tube amplifiers carry lethal voltages. Anodyne&apos;s figures are estimates; measure, and follow local codes and licensed practice.
      </p>
    </main>
  );
}
