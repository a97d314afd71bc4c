// The project's global feedback loop through its route: the seeded workshop amplifier with its stored loop,
// what-if values that re-solve margins, damping factor and distortion, refusals of bad values, and a project
// without a loop.
import { describe, expect, it } from 'vitest';
import * as feedbackRoute from '@/app/api/projects/[id]/feedback/route';
import * as reportRoute from '@/app/api/projects/[id]/report/route';
import { Project } from '@/models';
import { FEEDBACK_DEMO } from '@/seeders/20261202002000-demo-feedback-amplifier';
import { call } from '../support/api';

type Loop = {
  used: { resistor: number; shuntResistor: number; capacitor: number | null };
  feedback: {
    loopGainDb: number;
    phaseMargin: number | null;
    gainMargin: number | null;
    closedLoopGain: number;
    openLoopGain: number;
    dampingFactor: { open: number; closed: number };
    distortion: { closed: { thdPercent: number } | null; open: { thdPercent: number } };
    stability: { verdict: string; message: string };
    loopResponse: { frequency: number }[];
    squareWaves: { frequency: number }[];
  };
};

async function get(id: number, query = '') {
  const res = await call(feedbackRoute.GET, { as: 'designer', params: { id: String(id) }, path: `/api/projects/${id}/feedback?input=50m${query}` });
  return { status: res.status, body: res.json as { loop: Loop | null; error?: { code: string; fieldErrors?: Record<string, string[]> } } };
}

describe('GET /api/projects/{id}/feedback', () => {
  it('the workshop amplifier: margins, figures with and without the loop, plots 1 Hz – 1 MHz; what-if values re-solve them', async () => {
    const project = await Project.findOne({ where: { name: FEEDBACK_DEMO.name } });
    expect(project, 'the feedback demo is seeded').not.toBeNull();
    const base = await get(project!.id);
    expect(base.status).toBe(200);
    const loop = base.body.loop!;
    expect(loop.used).toEqual({ resistor: 10000, shuntResistor: 100, capacitor: 470e-12 });
    const fb = loop.feedback;
    expect(fb.loopGainDb).toBeGreaterThan(6);
    expect(fb.closedLoopGain).toBeLessThan(fb.openLoopGain);
    expect(fb.dampingFactor.closed).toBeGreaterThan(fb.dampingFactor.open);
    expect(fb.distortion.closed!.thdPercent).toBeLessThan(fb.distortion.open.thdPercent);
    expect(fb.phaseMargin).not.toBeNull();
    expect(fb.loopResponse[0]!.frequency).toBeCloseTo(1, 6);
    expect(fb.loopResponse.at(-1)!.frequency).toBeCloseTo(1e6, 0);
    expect(fb.squareWaves.map((w) => w.frequency)).toEqual([1000, 10000]);

    // a smaller feedback resistor: more loop gain, more damping, less distortion, less margin
    const more = (await get(project!.id, '&resistor=4k7')).body.loop!.feedback;
    expect(more.loopGainDb).toBeGreaterThan(fb.loopGainDb + 3);
    expect(more.dampingFactor.closed).toBeGreaterThan(fb.dampingFactor.closed);
    expect(more.distortion.closed!.thdPercent).toBeLessThan(fb.distortion.closed!.thdPercent);
    expect(more.phaseMargin!).toBeLessThan(fb.phaseMargin!);
    // taking the step capacitor away changes the high-end margin
    const noStep = (await get(project!.id, '&capacitor=none')).body.loop!;
    expect(noStep.used.capacitor).toBeNull();
    expect(noStep.feedback.phaseMargin).not.toBeCloseTo(fb.phaseMargin!, 1);
  });

  it('the design report of the amplifier renders with its feedback section', async () => {
    const project = await Project.findOne({ where: { name: FEEDBACK_DEMO.name } });
    const res = await call(reportRoute.GET, { as: 'designer', params: { id: String(project!.id) } });
    expect(res.status).toBe(200);
    expect(res.res.headers.get('content-type')).toBe('application/pdf');
    const pdf = Buffer.from(await res.res.arrayBuffer());
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(20_000);
  }, 120_000);

  it('refuses values that are not values, in the one error shape', async () => {
    const project = await Project.findOne({ where: { name: FEEDBACK_DEMO.name } });
    const bad = await get(project!.id, '&resistor=lots');
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error!.fieldErrors ?? {})).toContain('resistor');
    const neg = await get(project!.id, '&shuntResistor=-5');
    expect(neg.status).toBe(422);
  });

  it('a project without a loop answers null', async () => {
    const other = await Project.findOne({ where: { name: 'Crunch preamp (two 12AX7 stages + cathode follower)' } });
    expect(other).not.toBeNull();
    const res = await get(other!.id);
    expect(res.status).toBe(200);
    expect(res.body.loop).toBeNull();
  });
});
