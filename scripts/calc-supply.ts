// Usage: npm run -s calc -- --supply supply.json   (or "-" to read the circuit from stdin)
// Prints the solved supply as JSON (per node dc, ripplePeakToPeak, rippleRms, the rectifier figures, the ratings).
import { readFileSync } from 'node:fs';
import { CalcError } from '../lib/calc/errors';
import { solveSupply } from '../lib/calc/supply';
import { analyzeSupplySchema } from '../lib/validation/supply';

function fail(message: string, code: number): never {
  process.stderr.write(`${message}\n`);
  process.exit(code);
}

export function runSupplyCli(file: string | undefined): never {
  if (!file) fail('usage: npm run -s calc -- --supply FILE.json   (use - for stdin)', 64);
  let text: string;
  try {
    text = readFileSync(file === '-' ? 0 : file, 'utf8');
  } catch (err) {
    fail(`cannot read ${file}: ${(err as Error).message}`, 66);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    fail(`${file === '-' ? 'stdin' : file} is not valid JSON: ${(err as Error).message}`, 65);
  }
  const parsed = analyzeSupplySchema.safeParse(raw);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.length ? i.path.join('.') : '(supply)'}: ${i.message}`);
    fail(`invalid supply circuit:\n${lines.join('\n')}`, 1);
  }
  const { options, ...circuit } = parsed.data;
  try {
    process.stdout.write(`${JSON.stringify(solveSupply(circuit, options ?? {}), null, 2)}\n`);
  } catch (err) {
    if (err instanceof CalcError) fail(`${err.code}: ${err.message}`, 2);
    throw err;
  }
  process.exit(0);
}
