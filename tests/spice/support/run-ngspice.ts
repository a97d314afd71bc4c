// Runs ngspice in batch mode on a netlist and reads back `wrdata` tables and `res_*` values (test support only).
import { execFile, execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

export function requireNgspice(): void {
  try {
    execFileSync('ngspice', ['-v'], { stdio: 'pipe' });
  } catch {
    if (!process.env.CI_ALLOW_NO_SPICE) throw new Error('ngspice is not on PATH (apt-get install -y ngspice).');
  }
}

export const spiceNum = (x: number) => Number(x.toPrecision(12)).toString();

let dir: string | null = null;
function workDir(): string {
  dir ??= mkdtempSync(path.join(tmpdir(), 'anodyne-spice-'));
  return dir;
}

/** Runs the netlist; `{data:NAME}` in it is replaced by a file path whose table is returned as `tables[NAME]`. */
export async function ngspice(netlist: string, name: string): Promise<{ stdout: string; values: Record<string, number>; tables: Record<string, number[][]> }> {
  const d = workDir();
  const tableNames: string[] = [];
  const text = netlist.replace(/\{data:(\w+)\}/g, (_, t: string) => {
    tableNames.push(t);
    return path.join(d, `${name}-${t}.dat`);
  });
  const file = path.join(d, `${name}.cir`);
  writeFileSync(file, text);
  const stdout = await new Promise<string>((resolve, reject) => {
    execFile('ngspice', ['-b', file], { maxBuffer: 64 * 1024 * 1024, timeout: 300_000 }, (err, out, stderr) => {
      if (err) reject(new Error(`ngspice failed on ${name}: ${err.message}\n${stderr}`));
      else resolve(out);
    });
  });
  const values: Record<string, number> = {};
  for (const m of stdout.matchAll(/^\s*res_(\w+)\s*=\s*([-+0-9.eE]+)/gm)) values[m[1] as string] = Number(m[2]);
  const tables: Record<string, number[][]> = {};
  for (const t of tableNames) {
    tables[t] = readFileSync(path.join(d, `${name}-${t}.dat`), 'utf8')
      .trim()
      .split('\n')
      .map((l) => l.trim().split(/\s+/).map(Number));
  }
  return { stdout, values, tables };
}

/** Magnitude (linear) of a complex column pair in a wrdata table of an AC run: [f, re, im, ...]. */
export function acMagnitudes(table: number[][], col = 1): { f: number[]; mag: number[]; phase: number[] } {
  const f: number[] = [];
  const mag: number[] = [];
  const phase: number[] = [];
  for (const row of table) {
    f.push(row[0] as number);
    mag.push(Math.hypot(row[col] as number, row[col + 1] as number));
    phase.push((Math.atan2(row[col + 1] as number, row[col] as number) * 180) / Math.PI);
  }
  return { f, mag, phase };
}

/** First frequency, walking from `from` in direction `dir`, where the magnitude falls below `level` (log interpolation). */
export function firstBelow(f: number[], mag: number[], level: number, from: number, dir: 1 | -1): number | null {
  let i = f.findIndex((x) => x >= from);
  if (i < 0) return null;
  for (let j = i + dir; j >= 0 && j < f.length; j += dir) {
    const a = mag[j - dir] as number;
    const b = mag[j] as number;
    if (b < level && a >= level) {
      const la = Math.log(a);
      const lb = Math.log(b);
      const t = (Math.log(level) - la) / (lb - la);
      const fa = Math.log(f[j - dir] as number);
      const fb = Math.log(f[j] as number);
      return Math.exp(fa + t * (fb - fa));
    }
  }
  i = 0;
  return null;
}
