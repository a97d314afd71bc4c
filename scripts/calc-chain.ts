// Usage: npm run -s calc -- --chain chain.json   (or "-" to read the chain from stdin)
// Prints the chain solved end to end as JSON: per stage levels and limits, the output (gain, THD, power),
// the first clip, the frequency response and the level sweep. --no-sweep leaves the sweep out.
import { readFileSync } from 'node:fs';
import { CalcError } from '../lib/calc/errors';
import { analyzeChain } from '../lib/calc/chain/solve';
import { chainInputSchema } from '../lib/validation/chain';

function fail(message: string, code: number): never {
  process.stderr.write(`${message}\n`);
  process.exit(code);
}

export function runChainCli(args: string[]): never {
  const file = args.find((a) => !a.startsWith('--') || a === '-');
  const sweep = !args.includes('--no-sweep');
  if (!file) fail('usage: npm run -s calc -- --chain FILE.json [--no-sweep]   (use - for stdin)', 64);
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
  const parsed = chainInputSchema.safeParse(raw);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.length ? i.path.join('.') : '(chain)'}: ${i.message}`);
    fail(`invalid chain:\n${lines.join('\n')}`, 1);
  }
  try {
    process.stdout.write(`${JSON.stringify(analyzeChain(parsed.data, { sweep }), null, 2)}\n`);
  } catch (err) {
    if (err instanceof CalcError) fail(`${err.code}: ${err.message}`, 2);
    throw err;
  }
  process.exit(0);
}
