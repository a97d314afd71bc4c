// The design report draws the chain's level sweep: the seeded concertina amplifier's PDF carries the plot's axis
// titles with units, its numbered input axis (−40 to +10 dBV, the sweep's span) and the clip point's label.
import { PDFParse } from 'pdf-parse';
import { describe, expect, it } from 'vitest';
import * as projectRoute from '@/app/api/projects/[id]/route';
import { chainStagesFor, type ProjectDetail } from '@/lib/projects/service';
import { renderReportPdf } from '@/lib/report/pdf';
import { spanTicks } from '@/lib/report/sweep-plot';
import { Project } from '@/models';
import { call } from '../support/api';

describe('the level sweep plot in the report', () => {
  it('numbers negative dBV spans on round values', () => {
    expect(spanTicks(-40, 10, 6)).toEqual([-40, -30, -20, -10, 0, 10]);
    expect(spanTicks(34.3, 56, 5)).toEqual([35, 40, 45, 50, 55]);
  });

  it('is drawn in the concertina amplifier’s PDF with its axes and the clip point', async () => {
    const row = await Project.findOne({ where: { name: 'Workshop EL34 push-pull with a concertina splitter' } });
    expect(row, 'the demo seeder ran').not.toBeNull();
    const project = (await call(projectRoute.GET, { as: 'designer', params: { id: String(row!.id) } })).json.project as ProjectDetail;
    const chainInput = { stages: await chainStagesFor(project), supply: { ...project.supply, circuit: project.supplyCircuit }, options: { inputRms: 0.1, links: project.chainLinks } };
    const buf = await renderReportPdf(project, {}, chainInput);
    const text = (await new PDFParse({ data: new Uint8Array(buf) }).getText()).text;
    expect(text).toContain('input level (dBV)');
    expect(text).toContain('output (dBV)');
    expect(text).toContain('THD (%)');
    expect(text).toMatch(/clip -?\d+\.\d dBV/);
  }, 120_000);
});
