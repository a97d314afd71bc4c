import 'server-only';
// Worker threads from TypeScript sources. Inside Next (next start, next dev) the bundler builds a worker entry from
// `new Worker(new URL('./entry.ts', import.meta.url))` as its own chunk, so that expression stays at each call site.
// Run from sources instead (vitest, tsx scripts), Node cannot load the .ts/.tsx graph in a worker by itself, so the
// entry is bundled on the fly with esbuild, once per process. (Next keeps import.meta.url pointing at the source
// file, so the runtime, not the URL, tells the two apart.) Used by the report and the calculation pools.
import { existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** True when running from TypeScript sources rather than inside Next's server. */
export const runningFromSource = !process.env.NEXT_RUNTIME;

const bundles = new Map<string, string>();

function alive(pid: number) {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/** Bundles `entry` (a path from the project root) to node_modules/.cache/anodyne/<stem>-<pid>.mjs and returns it. */
export async function bundleWorkerFromSource(entry: string, stem: string): Promise<string> {
  const known = bundles.get(stem);
  if (known && existsSync(known)) return known;
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
  // One file per process: several test runs may bundle at the same time.
  const outfile = path.join(root, `node_modules/.cache/anodyne/${stem}-${process.pid}.mjs`);
  mkdirSync(path.dirname(outfile), { recursive: true });
  // Files left by runs that ended without an exit event (a test runner's killed fork).
  const mine = new RegExp(`^${stem}-(\\d+)\\.mjs$`);
  for (const f of readdirSync(path.dirname(outfile))) {
    const pid = Number(mine.exec(f)?.[1]);
    if (pid && !alive(pid)) rmSync(path.join(path.dirname(outfile), f), { force: true });
  }
  const esbuild = await import(/* turbopackIgnore: true */ /* webpackIgnore: true */ 'esbuild');
  await esbuild.build({
    entryPoints: [path.join(root, entry)],
    outfile,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    jsx: 'automatic',
    packages: 'external',
    alias: { '@': root },
    logLevel: 'silent',
  });
  bundles.set(stem, outfile);
  process.once('exit', () => rmSync(outfile, { force: true }));
  return outfile;
}
