import Link from 'next/link';

export default function Forbidden() {
  return (
    <main className="flex min-h-[60vh] flex-col items-center justify-center gap-2 px-4 text-center">
      <p className="num text-sm text-muted">403</p>
      <h1 className="text-xl font-semibold">Your role does not open this screen</h1>
      <p className="text-sm text-muted">Ask an admin if you need it.</p>
      <Link href="/" className="mt-2 text-sm text-heater-ink underline">Back to your start page</Link>
    </main>
  );
}
