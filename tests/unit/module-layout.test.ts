// The module map in DEVELOPERS.md, checked on the source: imports run one way, lib/ never reaches into components/,
// lib/db imports no feature, the mail and auth adapters call no feature service, and the seeders (run by tsx outside
// Next) never load a 'server-only' module, directly or through other modules.
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '../..');

function walk(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(path.join(root, dir))) {
    const rel = path.join(dir, name);
    if (statSync(path.join(root, rel)).isDirectory()) out.push(...walk(rel));
    else if (/\.(ts|tsx)$/.test(name) && !name.endsWith('.d.ts')) out.push(rel);
  }
  return out;
}

// Runtime imports only: `import type` and `export type` vanish at build time.
function imports(file: string): string[] {
  const src = readFileSync(path.join(root, file), 'utf8');
  const specs: string[] = [];
  const re = /^\s*(?:import|export)\s+(?!type\b)(?:[^'"]*?\sfrom\s+)?['"]([^'"]+)['"]/gm;
  for (let m = re.exec(src); m; m = re.exec(src)) specs.push(m[1]!);
  return specs;
}

function resolve(from: string, spec: string): string | null {
  let base: string;
  if (spec.startsWith('@/')) base = spec.slice(2);
  else if (spec.startsWith('.')) base = path.join(path.dirname(from), spec);
  else return null;
  for (const cand of [base, `${base}.ts`, `${base}.tsx`, path.join(base, 'index.ts')]) {
    if (existsSync(path.join(root, cand)) && statSync(path.join(root, cand)).isFile()) return path.normalize(cand);
  }
  return null;
}

const libFiles = walk('lib');

describe('module layout', () => {
  it('has no import from lib/ into components/', () => {
    const bad = libFiles.flatMap((f) => imports(f).filter((s) => /(^@\/components\/|\/components\/)/.test(s)).map((s) => `${f} → ${s}`));
    expect(bad).toEqual([]);
  });

  it('keeps lib/db to the connection, migrator (with the database role grants) and audit writer, importing no feature', () => {
    const files = libFiles.filter((f) => f.startsWith('lib/db/')).map((f) => path.basename(f)).sort();
    expect(files).toEqual(['audit.ts', 'index.ts', 'migrator.ts', 'roles.ts', 'sequelize.ts']);
    const bad = libFiles
      .filter((f) => f.startsWith('lib/db/'))
      .flatMap((f) => imports(f).map((s) => [f, s, resolve(f, s)] as const))
      .filter(([, , r]) => r !== null && r.startsWith('lib/') && !r.startsWith('lib/db/') && r !== 'lib/env.ts')
      .map(([f, s]) => `${f} → ${s}`);
    expect(bad).toEqual([]);
  });

  it('lets the mail and auth adapters and the report renderer call no feature service', () => {
    const bad = libFiles
      .filter((f) => /^lib\/(mail|auth|report|storage)\//.test(f))
      .flatMap((f) => imports(f).map((s) => [f, s, resolve(f, s)] as const))
      .filter(([, , r]) => r !== null && /^lib\/[a-z-]+\/service\.ts$/.test(r))
      .map(([f, s]) => `${f} → ${s}`);
    expect(bad).toEqual([]);
  });

  it("loads no 'server-only' module from a seeder, directly or through other modules", () => {
    const seen = new Set<string>();
    const serverOnly: string[] = [];
    const visit = (file: string, via: string) => {
      if (seen.has(file)) return;
      seen.add(file);
      const src = readFileSync(path.join(root, file), 'utf8');
      if (/^import ['"]server-only['"]/m.test(src)) serverOnly.push(`${file} (from ${via})`);
      for (const s of imports(file)) {
        const r = resolve(file, s);
        if (r) visit(r, file);
      }
    };
    const seeders = readdirSync(path.join(root, 'seeders')).filter((f) => f.endsWith('.ts'));
    expect(seeders.length).toBeGreaterThan(0);
    for (const f of seeders) visit(path.join('seeders', f), 'seeder');
    expect(seen.size).toBeGreaterThan(seeders.length);
    expect(serverOnly).toEqual([]);
  });
});
