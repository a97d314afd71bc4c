'use client';

// The chain solved end to end: the level sweep with its clip point, the whole chain's response, and the
// waveform of every stage that limits at the chosen input (clipped as it really is, not a projected level).
import { LevelSweepChart, ResponseChart, WaveformChart } from '@/components/charts/lazy';
import type { ChainAnalysis } from '@/lib/calc/chain/solve';
import { formatEng } from '@/lib/format/number';
import { LIMIT_WORDS } from '@/lib/report/labels';

const dbv = (peak: number) => 20 * Math.log10(Math.max(peak, 1e-12) / Math.SQRT2);

export function ChainLevels({ analysis, stale = false }: { analysis: ChainAnalysis; stale?: boolean }) {
  const a = analysis;
  const clipped = a.stages.filter((s) => s.clipped);
  const limiting = clipped.length ? clipped : [];
  return (
    <section className="space-y-4" data-testid="chain-levels" aria-label="Chain solved end to end">
      <div className="grid gap-4 lg:grid-cols-2">
        <div>
          <h3 className="mb-1 text-sm font-medium">Level sweep</h3>
          <p className="mb-2 text-xs text-muted">
            {a.firstClip ? (
              <>
                First limit: <span className="text-ink">{a.firstClip.stage}</span> ({LIMIT_WORDS[a.firstClip.limitedBy] ?? a.firstClip.limitedBy}) at{' '}
                <span className="num text-ink">{formatEng(a.firstClip.inputAmplitude / Math.SQRT2, 'V')}</span> rms in (
                <span className="num">{a.firstClip.inputDbv.toFixed(1)} dBV</span>).
              </>
            ) : (
              'No stage limits up to +30 dBV in.'
            )}
          </p>
          {a.sweep ? <LevelSweepChart points={a.sweep.points} clip={a.sweep.clip} inputDbv={a.input.amplitude > 0 ? dbv(a.input.amplitude) : null} stale={stale} /> : null}
        </div>
        <div>
          <h3 className="mb-1 text-sm font-medium">Frequency response of the whole chain</h3>
          <p className="mb-2 text-xs text-muted">Small signal, every stage loaded by the next, from the source to the output.</p>
          <ResponseChart points={a.response} height={260} stale={stale} />
        </div>
      </div>
      {limiting.length ? (
        <div data-testid="chain-clipped-waveforms">
          <h3 className="mb-1 text-sm font-medium">Waveforms of the stages that limit at this input</h3>
          <div className="grid gap-4 lg:grid-cols-2">
            {limiting.map((s) => (
              <figure key={s.id}>
                <figcaption className="mb-1 text-xs text-muted">
                  {s.id}: {LIMIT_WORDS[s.limitedBy] ?? s.limitedBy}; output{' '}
                  <span className="num text-ink">{formatEng((Object.values(s.outputs)[0]?.amplitude ?? 0) / Math.SQRT2, 'V')}</span> rms, THD{' '}
                  <span className="num text-ink">{(Object.values(s.outputs)[0]?.thdPercent ?? 0).toFixed(1)} %</span>
                  {s.notes.length ? <span className="block">{s.notes.join(' ')}</span> : null}
                </figcaption>
                <WaveformChart t={s.waveform.t} input={s.waveform.input} output={s.waveform.output} height={220} stale={stale} />
              </figure>
            ))}
          </div>
        </div>
      ) : null}
      {a.networks.length ? (
        <div className="grid gap-4 lg:grid-cols-2">
          {a.networks.map((n) => (
            <div key={n.id}>
              <h3 className="mb-1 text-sm font-medium">Network {n.id} alone ({n.topology === 'volume-control' ? 'volume control' : 'RC network'})</h3>
              <ResponseChart points={n.response} height={200} stale={stale} />
            </div>
          ))}
        </div>
      ) : null}
    </section>
  );
}
