// The chain solved end to end through the real routes and database: POST /api/analyze-chain (levels, response,
// sweep; bad input answered with field errors) and the seeded concertina amplifier's chain view solution, whose
// levels must all be levels the stages can produce (from the end-to-end waveforms, not a product of gains).
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import * as analyzeChainRoute from '@/app/api/analyze-chain/route';
import * as chainRoute from '@/app/api/projects/[id]/chain/route';
import type { ChainResult } from '@/lib/calc/chain';
import type { ChainAnalysis } from '@/lib/calc/chain/solve';
import { Project } from '@/models';
import { call } from '../support/api';

const fixture = (name: string) => JSON.parse(readFileSync(path.resolve(__dirname, `../fixtures/chains/${name}.json`), 'utf8'));

describe('POST /api/analyze-chain', () => {
  it('solves a chain with a splitter and a push-pull pair end to end', async () => {
    const res = await call(analyzeChainRoute.POST, { as: 'technician', method: 'POST', body: { ...fixture('preamp-ltp-pp'), options: { sweep: true } } });
    expect(res.status).toBe(200);
    const { chain } = res.json as { chain: ChainAnalysis };
    expect(chain.stages.map((s) => s.id)).toEqual(['v1', 'ltp', 'pp']);
    expect(Object.keys(chain.stages[1]!.outputs).sort()).toEqual(['inverting', 'non-inverting']);
    // each stage's input is the previous stage's solved output (through a coupling capacitor at 1 kHz)
    expect(chain.stages[1]!.inputAmplitude / chain.stages[0]!.outputs.plate!.amplitude).toBeGreaterThan(0.99);
    expect(chain.output.power).toBeGreaterThan(0);
    expect(chain.response.length).toBeGreaterThanOrEqual(41);
    expect(chain.sweep!.points.length).toBeGreaterThanOrEqual(40);
    expect(chain.sweep!.points[0]!.inputDbv).toBeCloseTo(-40, 9);
    expect(chain.sweep!.points.at(-1)!.inputDbv).toBeCloseTo(10, 9);
    expect(chain.firstClip).not.toBeNull();
  });

  it('answers bad input with field errors, not a 500', async () => {
    const body = fixture('two-triodes');
    body.links[0].to = 'nowhere';
    body.input.amplitude = -1;
    const res = await call(analyzeChainRoute.POST, { as: 'designer', method: 'POST', body });
    expect(res.status).toBe(422);
    const err = res.json as { error: { fieldErrors: Record<string, string[]> } };
    expect(Object.keys(err.error.fieldErrors)).toEqual(expect.arrayContaining(['input.amplitude', 'links.0.to']));
  });

  it('names the output a link asks for when the stage has no such output', async () => {
    const body = fixture('two-triodes');
    body.links[0].output = 'cathode';
    const res = await call(analyzeChainRoute.POST, { as: 'designer', method: 'POST', body });
    expect(res.status).toBe(422);
    expect((res.json as { error: { message: string } }).error.message).toMatch(/no output 'cathode'/);
  });
});

describe('the seeded concertina amplifier', () => {
  it('is solved end to end on its chain view: clipped levels as they are, sweep with the clip point', async () => {
    const project = await Project.findOne({ where: { name: 'Workshop EL34 push-pull with a concertina splitter' } });
    expect(project, 'the demo seeder ran').not.toBeNull();
    expect(project!.chainLinks?.[0]?.coupling.kind).toBe('direct');
    const res = await call(chainRoute.GET, { as: 'designer', params: { id: String(project!.id) }, path: `/api/projects/${project!.id}/chain?input=1` });
    expect(res.status).toBe(200);
    const { chain } = res.json as { chain: ChainResult };
    expect(chain.endToEndError).toBeNull();
    const e2e = chain.endToEnd!;
    expect(e2e.stages.map((s) => s.topology)).toEqual(['common-cathode', 'split-load', 'push-pull-output']);
    // 1 V rms in drives the chain past its clip point: the output is the clipped level, well under input × gain
    expect(chain.firstClip!.chainInputRms).toBeLessThan(1);
    expect(chain.stages.some((s) => s.clipping)).toBe(true);
    expect(chain.outputRms!).toBeCloseTo(e2e.output.amplitude / Math.SQRT2, 9);
    expect(chain.outputRms!).toBeLessThan(0.5 * 1 * chain.totalGain!);
    // no stage is shown an output it cannot produce: each level is its own solved waveform's
    for (const s of chain.stages) {
      const solved = e2e.stages.find((x) => x.id === String(s.stageId))!;
      expect(s.outputRms!).toBeCloseTo(Object.values(solved.outputs)[0]!.amplitude / Math.SQRT2, 9);
    }
    const clipped = e2e.stages.find((s) => s.clipped)!;
    expect(clipped.waveform.output.length).toBeGreaterThanOrEqual(60);
    expect(e2e.sweep!.clip).not.toBeNull();
    // the supply ladder still solves with the splitter's current
    expect(chain.supply?.converged).toBe(true);
  });
});
