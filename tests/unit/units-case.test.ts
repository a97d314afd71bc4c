// Units never change case on screen: a heading set in capitals turned "mV" into "MV" (a million volts). Style the
// text by weight and colour, never by text-transform, anywhere a unit may appear.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

const root = path.resolve(__dirname, '../..');

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? files(p) : /\.(tsx|ts|css)$/.test(name) ? [p] : [];
  });
}

describe('units keep their case', () => {
  it('no screen, PDF or stylesheet transforms text case', () => {
    const offenders = ['app', 'components', 'lib/report']
      .flatMap((d) => files(path.join(root, d)))
      .filter((f) => /\buppercase\b|text-transform:\s*uppercase|textTransform:\s*['"]uppercase/.test(readFileSync(f, 'utf8')))
      .map((f) => path.relative(root, f));
    expect(offenders).toEqual([]);
  });
});
