import 'server-only';
import { Document, Page, StyleSheet, Text, View, renderToBuffer } from '@react-pdf/renderer';
import { stageResults } from '@/lib/review/diff';
import type { RevisionSnapshot } from '@/lib/review/types';
import { formatEng } from '@/lib/units';

// A compact PDF of a frozen revision (used for the decision mail when the full project report is not available).
const s = StyleSheet.create({
  page: { padding: 36, fontSize: 9, fontFamily: 'Helvetica', color: '#1f2328' },
  brand: { fontSize: 8, color: '#8a4a0c', letterSpacing: 1 },
  h1: { fontSize: 16, marginTop: 2, marginBottom: 4, fontFamily: 'Helvetica-Bold' },
  h2: { fontSize: 11, marginTop: 12, marginBottom: 4, fontFamily: 'Helvetica-Bold' },
  meta: { color: '#6a6358', marginBottom: 2 },
  mono: { fontFamily: 'Courier', fontSize: 8 },
  row: { flexDirection: 'row', borderBottomWidth: 0.5, borderBottomColor: '#d9d0bf', paddingVertical: 2 },
  cellL: { width: '55%' },
  cellR: { width: '45%', fontFamily: 'Courier' },
  caution: { marginTop: 16, padding: 6, borderWidth: 0.5, borderColor: '#d9822b', fontSize: 8 },
});

export type RevisionPdfMeta = {
  number: number;
  contentHash: string;
  submittedBy: string | null;
  submittedAt: string;
  decision: { decision: 'approve' | 'request-changes'; reviewer: string; comment: string; at: string } | null;
};

function RevisionDocument({ snapshot, meta }: { snapshot: RevisionSnapshot; meta: RevisionPdfMeta }) {
  return (
    <Document title={`${snapshot.name} revision ${meta.number}`} author="Anodyne">
      <Page size="A4" style={s.page}>
        <Text style={s.brand}>ANODYNE · REVISION REPORT</Text>
        <Text style={s.h1}>
          {snapshot.name} · revision {meta.number}
        </Text>
        <Text style={s.meta}>
          Submitted by {meta.submittedBy ?? 'unknown'} on {meta.submittedAt.slice(0, 16).replace('T', ' ')} UTC
        </Text>
        {meta.decision ? (
          <Text style={s.meta}>
            {meta.decision.decision === 'approve' ? 'Approved' : 'Changes requested'} by {meta.decision.reviewer} on {meta.decision.at.slice(0, 16).replace('T', ' ')} UTC
          </Text>
        ) : null}
        <Text style={[s.meta, s.mono]}>Content hash {meta.contentHash}</Text>
        {meta.decision?.comment ? <Text style={{ marginTop: 6 }}>Reviewer’s comment: {meta.decision.comment}</Text> : null}
        {snapshot.description ? <Text style={{ marginTop: 6 }}>{snapshot.description}</Text> : null}
        {snapshot.stages.map((st) => (
          <View key={st.id} wrap={false}>
            <Text style={s.h2}>
              {st.position}. {st.name} ({st.tubeDesignation}, {st.topology.replace(/-/g, ' ')})
            </Text>
            {st.analysisError ? <Text style={{ color: '#b3261e' }}>Calculation error: {st.analysisError.message}</Text> : null}
            {stageResults(st)
              .filter((r) => typeof r.value === 'number')
              .map((r) => (
                <View key={r.path} style={s.row}>
                  <Text style={s.cellL}>{r.label}</Text>
                  <Text style={s.cellR}>{r.unit === '%' ? `${(r.value as number).toFixed(2)} %` : formatEng(r.value as number, r.unit)}</Text>
                </View>
              ))}
            {(st.analysis?.ratings ?? []).map((r) => (
              <View key={r.key} style={s.row}>
                <Text style={s.cellL}>Rating: {r.label}</Text>
                <Text style={s.cellR}>
                  {formatEng(r.value, r.unit)}
                  {r.limit ? ` of ${formatEng(r.limit, r.unit)}` : ''} · {r.status}
                </Text>
              </View>
            ))}
          </View>
        ))}
        <Text style={s.caution}>
          Lethal voltages: B+ and plate supplies in tube amplifiers can kill, and filter capacitors hold their charge after switch-off. Figures are estimates from tube models, to be confirmed by
          measurement with suitable instruments. Local electrical codes and licensed practice come first.
        </Text>
      </Page>
    </Document>
  );
}

export async function renderRevisionPdf(snapshot: RevisionSnapshot, meta: RevisionPdfMeta): Promise<Buffer> {
  return renderToBuffer(<RevisionDocument snapshot={snapshot} meta={meta} />);
}

