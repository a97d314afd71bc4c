import Link from 'next/link';

export default function NotFound() {
  return (
    <main className="flex min-h-[60vh] flex-col items-center justify-center gap-2 px-4 text-center">
      <p className="num text-sm text-muted">404</p>
      <h1 className="text-xl font-semibold">Nothing at this address</h1>
      <p className="text-sm text-muted">The page may have moved, or the record was removed.</p>
      <Link href="/" className="mt-2 text-sm text-heater-ink underline">Back to the start</Link>
    </main>
  );
}
