// Writes the invented demo curve set used by the seeder: npx tsx scripts/make-demo-curves.ts
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { makeDemoCurvesCsv } from '../lib/curves/demo-curves';

const out = path.resolve(__dirname, '..', 'seeders', 'data', 'demo-12ax7-curves.csv');
mkdirSync(path.dirname(out), { recursive: true });
const csv = makeDemoCurvesCsv();
writeFileSync(out, csv);
console.log(`wrote ${csv.trim().split('\n').length - 1} demo points to ${path.relative(process.cwd(), out)}`);
