import { StatusBadge } from '@/components/ui/badge';
import { Card, CardBody, CardHeader } from '@/components/ui/card';
import { stageInputRows, stageResults } from '@/lib/review/diff';
import type { RevisionSnapshot } from '@/lib/review/types';
import { formatEng, formatValue } from '@/lib/format/number';
import { circuitNodes } from '@/lib/calc/supply/ladder';
import type { ProjectSupplyCircuitRecord } from '@/models/types';

// The engine's results exactly as frozen in the revision: what the reviewer signs off.
export function FrozenResults({ snapshot }: { snapshot: RevisionSnapshot }) {
  return (
    <Card>
      <CardHeader title="Frozen inputs and results" actions={<span className="text-xs text-muted">as designed and calculated when submitted</span>} />
      <CardBody className="grid gap-5 lg:grid-cols-2" data-testid="frozen-results">
        {snapshot.supplyCircuit ? <FrozenSupply circuit={snapshot.supplyCircuit} /> : null}
        {snapshot.stages.map((s) => (
          <section key={s.id} className="space-y-2">
            <h3 className="text-sm font-semibold">
              {s.position}. {s.name} <span className="num text-xs font-normal text-muted">{s.tubeDesignation} · {s.topology.replace(/-/g, ' ')}</span>
            </h3>
            {s.analysisError ? (
              <p role="alert" className="rounded-md border border-over/40 bg-over/10 px-3 py-2 text-sm">
                Calculation error: {s.analysisError.message}
              </p>
            ) : null}
            <details className="rounded-md border border-rule px-3 py-1.5 text-sm">
              <summary className="cursor-pointer text-xs font-semibold text-muted">Inputs</summary>
              <table className="mt-1 w-full">
                <tbody className="divide-y divide-rule">
                  {stageInputRows(s).map((r) => (
                    <tr key={r.path}>
                      <td className="py-1 pr-2 text-muted">{r.label}</td>
                      <td className="num py-1 text-right">{formatValue(r.value, r.unit)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </details>
            <table className="w-full text-sm">
              <tbody className="divide-y divide-rule">
                {stageResults(s)
                  .filter((r) => r.value !== null)
                  .map((r) => (
                    <tr key={r.path}>
                      <td className="py-1 pr-2 text-muted">{r.label}</td>
                      <td className="num py-1 text-right">{formatValue(r.value, r.unit)}</td>
                    </tr>
                  ))}
                {(s.analysis?.ratings ?? []).map((r) => (
                  <tr key={r.key}>
                    <td className="py-1 pr-2 text-muted">{r.label}</td>
                    <td className="num py-1 text-right">
                      <span className="inline-flex items-center gap-2">
                        {formatValue(r.value, r.unit)}
                        {r.limit ? <span className="text-xs text-muted">of {formatValue(r.limit, r.unit)}</span> : null}
                        <StatusBadge status={r.status} />
                      </span>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            {s.analysis?.warnings?.length ? (
              <ul className="list-disc pl-5 text-xs text-near">
                {s.analysis.warnings.map((w) => (
                  <li key={w}>{w}</li>
                ))}
              </ul>
            ) : null}
          </section>
        ))}
      </CardBody>
    </Card>
  );
}

// The supply circuit as submitted (its solution is in the design report and on the project page).
function FrozenSupply({ circuit }: { circuit: ProjectSupplyCircuitRecord }) {
  const rect = circuit.rectifier.kind === 'silicon-bridge' ? 'silicon bridge' : circuit.rectifier.kind === 'silicon-centre-tap' ? 'silicon centre tap' : 'vacuum full-wave';
  return (
    <section className="space-y-1 lg:col-span-2" data-testid="frozen-supply">
      <h3 className="text-sm font-semibold">Supply circuit</h3>
      <p className="text-sm">
        {formatEng(circuit.mains.voltage, 'V')} {circuit.mains.frequency} Hz mains (±{Math.round((circuit.mains.variation ?? 0.1) * 100)} %) · secondary {formatEng(circuit.secondary.voltage, 'V')} rms
        {circuit.rectifier.kind === 'silicon-bridge' ? '' : ' each half'}, {formatEng(circuit.secondary.resistance, 'Ω')} · {rect} {circuit.rectifier.type ?? ''} ·{' '}
        {circuit.reservoir ? 'capacitor input' : 'choke input'}
      </p>
      <ul className="num flex flex-wrap gap-x-4 text-xs text-muted">
        {circuitNodes(circuit).map((n) => (
          <li key={n.key}>
            {n.key} {n.name}: {n.inductance > 0 ? `${formatEng(n.inductance, 'H')} + ` : ''}{formatEng(n.droppingResistor, 'Ω')} → {formatEng(n.filterCapacitor, 'F')}
          </li>
        ))}
      </ul>
    </section>
  );
}
