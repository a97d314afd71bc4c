// The quick analysis used by tolerance runs and part searches gives the full analysis's results (computed by us:
// a consistency check of the 64-sample cycle against the 256-sample one, not an outside check).
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzeStage } from '@/lib/calc';
import { stageInputSchema } from '@/lib/validation/stage';

const dir = path.resolve(__dirname, '../../fixtures/stages');

describe('quick analysis', () => {
  for (const f of readdirSync(dir).filter((x) => x.endsWith('.json'))) {
    it(`${f}: same operating point, gain, headroom; THD and output power within 0.5 %`, () => {
      const input = stageInputSchema.parse(JSON.parse(readFileSync(path.join(dir, f), 'utf8')));
      const full = analyzeStage(input);
      const quick = analyzeStage(input, { quick: true });
      expect(quick.operatingPoint).toEqual(full.operatingPoint);
      expect(quick.smallSignal.gain).toBe(full.smallSignal.gain);
      expect(quick.largeSignal.headroom.maxDrive).toBeCloseTo(full.largeSignal.headroom.maxDrive, 9);
      expect(quick.ratings.map((r) => r.status)).toEqual(full.ratings.map((r) => r.status));
      const thd = full.largeSignal.thdPercent;
      expect(Math.abs(quick.largeSignal.thdPercent - thd)).toBeLessThanOrEqual(Math.max(0.005 * thd, 1e-3));
      if (full.largeSignal.outputPower !== null) expect(Math.abs(quick.largeSignal.outputPower! / full.largeSignal.outputPower - 1)).toBeLessThan(0.005);
      expect(quick.plot.curves).toEqual([]);
      expect(quick.smallSignal.response).toEqual([]);
      const op = analyzeStage(input, { operatingPointOnly: true });
      expect(op.operatingPoint).toEqual(full.operatingPoint);
    });
  }
});
