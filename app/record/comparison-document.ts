/** The content of a comparison record, in reading order (see record-document.ts). */
import type { RunFigures } from '../contract/contract';
import type { Block, RecordDocument } from './record-document';
import type { ComparisonRecord } from './model';
import { comparisonPlots } from './record-plots';
import { figureLines, formatDb, formatHz, formatMaybe, idnText, verdictHeadline } from './record-formatting';
import { SIMULATED_BANNER } from './run-document';
import { BENCH_WORDS, FIGURE_NAMES } from '../contract/vocabulary';

/** Figures shown side by side, with how to print a value and its delta. */
const COMPARED_FIGURES: Array<{ key: keyof RunFigures; label: string; format: (v: number) => string; formatDelta: (v: number) => string }> = [
  { key: 'passbandGainDb', label: FIGURE_NAMES.passbandGainDb, format: (v) => formatDb(v), formatDelta: (v) => signed(formatDb(v)) },
  { key: 'minus3dbHz', label: FIGURE_NAMES.minus3dbHz, format: formatHz, formatDelta: (v) => signed(formatHz(v)) },
  { key: 'gainLimitHz', label: FIGURE_NAMES.gainLimitHz, format: formatHz, formatDelta: (v) => signed(formatHz(v)) },
  { key: 'gbwEstimateHz', label: FIGURE_NAMES.gbwEstimateHz, format: formatHz, formatDelta: (v) => signed(formatHz(v)) },
  { key: 'maxDeviationDb', label: FIGURE_NAMES.maxDeviationDb, format: (v) => formatDb(v), formatDelta: (v) => signed(formatDb(v)) },
];

/** A delta with its sign always written: "+1.20 dB", "−3 Hz" (the formatters write the true minus). */
function signed(text: string): string {
  return text.startsWith('−') ? text : `+${text}`;
}

function figureValue(figures: RunFigures, key: keyof RunFigures, format: (v: number) => string): string {
  const value = figures[key];
  if (Array.isArray(value)) return value.length ? value.map((v) => format(v as number)).join(', ') : '—';
  return formatMaybe(typeof value === 'number' ? value : null, format);
}

export function comparisonDocument(record: ComparisonRecord): RecordDocument {
  const referenceText = record.reference === 'theory' ? 'theory of each run' : `run ${record.reference}`;
  const failed = record.figureTable.filter((row) => row.verdict && !row.verdict.pass).length;
  const judged = record.figureTable.filter((row) => row.verdict).length;
  const blocks: Block[] = [
    {
      kind: 'verdict',
      pass: judged === 0 ? null : failed === 0,
      headline: judged === 0 ? 'NO VERDICT (no limits were set)' : failed === 0 ? `PASS (all ${judged} judged runs)` : `FAIL (${failed} of ${judged} judged runs)`,
      reasons: record.figureTable.flatMap((row) => (row.verdict && !row.verdict.pass ? row.verdict.reasons.map((r) => `Run ${row.runId}: ${r}`) : [])),
    },
    {
      kind: 'keyValues',
      rows: [
        ['Reference', referenceText],
        ['Runs', record.runs.map((r) => String(r.run.id)).join(', ')],
        ['Comparison digest (SHA-256)', record.digest.hex],
      ],
    },
    {
      kind: 'table',
      caption: 'Compared runs',
      columns: ['Run', 'Build', 'Design', 'Kind', 'Status', 'Started', 'Operator', 'Bench', 'Points', 'Run digest (SHA-256)'],
      rows: record.runs.map((r) => [
        String(r.run.id), r.build.label, r.design.name, r.run.kind, r.run.status, r.run.startedAt ?? '—', r.run.operator || '—',
        r.run.simulated ? BENCH_WORDS.simulated : BENCH_WORDS.real, String(r.run.pointCount), r.digest.hex,
      ]),
    },
    { kind: 'heading', text: 'Overlay and difference' },
    ...comparisonPlots(record).map((spec) => ({ kind: 'plot' as const, spec })),
    { kind: 'heading', text: 'Extracted figures' },
    {
      kind: 'table',
      caption: `Δ is the figure minus the same figure of the ${referenceText}.`,
      columns: ['Run', 'Build', ...COMPARED_FIGURES.flatMap((f) => [f.label, 'Δ']), 'Verdict'],
      rows: record.figureTable.map((row) => [
        String(row.runId),
        row.label,
        ...COMPARED_FIGURES.flatMap((f) => {
          const delta = row.deltas[f.key];
          return [figureValue(row.figures, f.key, f.format), typeof delta === 'number' && Number.isFinite(delta) ? f.formatDelta(delta) : '—'];
        }),
        verdictHeadline(row.verdict).split(' ')[0],
      ]),
    },
  ];
  for (const run of record.runs) {
    const lines = figureLines(run.figures).filter((l) => l.key.startsWith('logFit'));
    blocks.push(
      { kind: 'heading', text: `Run ${run.run.id}: ${run.build.label}` },
      {
        kind: 'keyValues',
        rows: [
          ['Build notes', run.build.notes || '—'],
          ['Run notes', run.run.notes || '—'],
          ['Verdict', `${verdictHeadline(run.verdict)}${run.verdict?.reasons.length ? ` — ${run.verdict.reasons.join(' ')}` : ''}`],
          ...run.bench.map((i): [string, string] => [`${i.role} (${i.address})`, `${idnText(i.identity)}${i.simulated ? ' [simulated]' : ''}`]),
          ...lines.map((l): [string, string] => [l.label, l.value]),
        ],
      },
    );
  }
  blocks.push(
    { kind: 'heading', text: 'Data digest' },
    { kind: 'keyValues', rows: [['SHA-256', record.digest.hex], ['Method', record.digest.method], ['Run digests', record.runs[0]?.digest.method ?? '']] },
    { kind: 'heading', text: 'Safety' },
    { kind: 'list', items: record.safetyNotice },
  );
  return {
    title: record.title,
    banner: record.runs.some((r) => r.run.simulated) ? SIMULATED_BANNER : null,
    blocks,
    footer: `${record.generatedBy} — record generated ${record.generatedAt} — SHA-256 ${record.digest.hex.slice(0, 16)}…`,
  };
}
