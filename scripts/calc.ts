// Usage: npm run -s calc -- stage.json   (or "-" to read the stage from stdin)
import { readFileSync } from 'node:fs';
import { analyzeStage, CalcError } from '../lib/calc';
import { stageInputSchema } from '../lib/validation/stage';
import { runChainCli } from './calc-chain';
import { runSupplyCli } from './calc-supply';

process.stdout.on('error', (err: NodeJS.ErrnoException) => {
  if (err.code === 'EPIPE') process.exit(0);
  throw err;
});

function fail(message: string, code: number): never {
  process.stderr.write(`${message}\n`);
  process.exit(code);
}

const arg = process.argv[2];
if (arg === '--supply') runSupplyCli(process.argv[3]);
if (arg === '--chain') runChainCli(process.argv.slice(3));
if (!arg) fail('usage: npm run -s calc -- FILE.json   (use - for stdin)', 64);

let text: string;
try {
  text = readFileSync(arg === '-' ? 0 : arg, 'utf8');
} catch (err) {
  fail(`cannot read ${arg}: ${(err as Error).message}`, 66);
}

let raw: unknown;
try {
  raw = JSON.parse(text);
} catch (err) {
  fail(`${arg === '-' ? 'stdin' : arg} is not valid JSON: ${(err as Error).message}`, 65);
}

const parsed = stageInputSchema.safeParse(raw);
if (!parsed.success) {
  const lines = parsed.error.issues.map((i) => `  ${i.path.length ? i.path.join('.') : '(stage)'}: ${i.message}`);
  fail(`invalid stage input:\n${lines.join('\n')}`, 1);
}

try {
  process.stdout.write(`${JSON.stringify(analyzeStage(parsed.data), null, 2)}\n`);
} catch (err) {
  if (err instanceof CalcError) fail(`${err.code}: ${err.message}`, 2);
  throw err;
}
