/** The content of a run record, in reading order (see record-document.ts). */
import { formatEngineering, formatFixed, formatInUnit, parseEngineering } from '../units';
import type { Block, RecordDocument } from './record-document';
import { recordOutputV, type RecordDesign, type RunRecord } from './model';
import { runPlots } from './record-plots';
import { figureLines, flagWords, formatDb, formatHz, formatMaybe, formatMeasured, formatVolts, idnText, offlinePeriodsText, verdictHeadline } from './record-formatting';
import { BENCH_WORDS, DIODE_MODEL_PARAMETERS, FIGURE_NAMES, OPAMP_MODEL_PARAMETERS, SETTINGS, pointCountText } from '../contract/vocabulary';

export const SIMULATED_BANNER = 'SIMULATED BENCH — these readings come from the simulated bench and describe a computed circuit, not a physical board.';

export function runDocument(record: RunRecord): RecordDocument {
  const { run } = record;
  const blocks: Block[] = [
    { kind: 'verdict', pass: record.verdict ? record.verdict.pass : null, headline: verdictHeadline(record.verdict), reasons: record.verdict?.reasons ?? [] },
    runFactsBlock(record, run.kind === 'ac' ? 'AC frequency sweep' : 'DC transfer sweep', ['Points', pointCountText(run.plannedCount, record.points.flags)]),
    ...benchBlocks(record),
    ...designBlocks(record.design, record),
    ...planBlocks(record),
    { kind: 'heading', text: run.kind === 'ac' ? 'Frequency response' : 'DC transfer' },
    ...runPlots(record).map((spec) => ({ kind: 'plot' as const, spec })),
    ...figureBlocks(record),
    ...pointBlocks(record),
    ...eventBlocks(record),
  ];
  return runRecordDocument(record, blocks);
}

/** What a run's record names first: the run, what it measured, when, with what, and its digest. */
export function runFactsBlock(record: Pick<RunRecord, 'build' | 'design' | 'digest'> & { run: Omit<RunRecord['run'], 'kind' | 'plan'> }, kindText: string, countRow: [string, string]): Block {
  const { run } = record;
  return {
    kind: 'keyValues',
    rows: [
      ['Run', `${run.id} (${kindText}, ${run.status})`],
      ['Build', record.build.label],
      ['Design', record.design.name],
      ['Operator', run.operator || '—'],
      ['Started', run.startedAt ?? '—'],
      ['Ended', run.endedAt ?? '—'],
      countRow,
      ['Software that measured the run', `Rolloff ${run.softwareVersion}`],
      ['Bench', run.simulated ? BENCH_WORDS.simulated : BENCH_WORDS.real],
      ['Store unreachable (points kept in the bench\'s outbox)', offlinePeriodsText(run.offlinePeriods)],
      ['Data digest (SHA-256)', record.digest.hex],
    ],
  };
}

/** A run's record around its blocks: the digest and the safety notice after them, the simulated banner and the footer. */
export function runRecordDocument(record: Pick<RunRecord, 'title' | 'digest' | 'safetyNotice' | 'generatedBy' | 'generatedAt'> & { run: { id: number; simulated: boolean } }, blocks: Block[]): RecordDocument {
  const { run } = record;
  return {
    title: record.title,
    banner: run.simulated ? SIMULATED_BANNER : null,
    blocks: [
      ...blocks,
      { kind: 'heading', text: 'Data digest' },
      { kind: 'keyValues', rows: [['SHA-256', record.digest.hex], ['Method', record.digest.method]] },
      { kind: 'heading', text: 'Safety' },
      { kind: 'list', items: record.safetyNotice },
    ],
    footer: `${record.generatedBy} — record generated ${record.generatedAt} — run ${run.id} — SHA-256 ${record.digest.hex.slice(0, 16)}…`,
  };
}

export function benchBlocks(record: Pick<RunRecord, 'bench'>): Block[] {
  return [
    { kind: 'heading', text: 'Bench' },
    {
      kind: 'table',
      columns: ['Role', 'Address', 'Profile', '*IDN? reply', 'Simulated'],
      rows: record.bench.map((i) => [i.role, i.address, i.profileId, idnText(i.identity), i.simulated ? 'yes' : 'no']),
    },
  ];
}

interface DesignPartView {
  id: string;
  kind: string;
  nodes: string;
  value: number | null;
  /** Model parameters for op-amps and diodes, as text. */
  modelText: string | null;
}

/** Op-amp and diode model fields with the names and units people read (app/contract/vocabulary.ts). */
const MODEL_FIELDS = [...OPAMP_MODEL_PARAMETERS, ...DIODE_MODEL_PARAMETERS];

function modelText(model: unknown): string | null {
  if (!model || typeof model !== 'object') return null;
  const m = model as Record<string, unknown>;
  const fields = MODEL_FIELDS.filter(({ key }) => typeof m[key] === 'number').map((p) => {
    const value = m[p.key] as number;
    // A0 is a plain ratio: 100000, not "100 kV/V".
    const text = p.perSi !== undefined ? formatInUnit(value, p.perSi, p.unit) : p.unit === 'V/V' ? formatInUnit(value, 1, '') : formatEngineering(value, p.unit);
    return `${p.symbol} ${text}`;
  });
  if (Array.isArray(m.rails)) fields.push(`rails ${m.rails.map((v) => formatEngineering(Number(v), 'V')).join(' / ')}`);
  if (m.ideal === true) fields.push('ideal');
  return fields.length ? fields.join(', ') : null;
}

/** Design files may give values as numbers or in engineering notation ("10k"). */
function partValue(value: unknown): number | null {
  if (typeof value === 'number') return Number.isFinite(value) ? value : null;
  if (typeof value !== 'string') return null;
  try {
    return parseEngineering(value);
  } catch {
    return null; // shown as "—"; the design file below keeps the text as written
  }
}

/** Reads parts from a design file if it has a parts list; the full JSON is shown anyway. */
function designParts(content: unknown): DesignPartView[] {
  const parts = (content as { parts?: unknown } | null)?.parts;
  if (!Array.isArray(parts)) return [];
  return parts.flatMap((part) => {
    if (!part || typeof part !== 'object') return [];
    const p = part as Record<string, unknown>;
    const id = String(p.id ?? p.name ?? '?');
    const kind = String(p.type ?? p.kind ?? '');
    const nodes = Array.isArray(p.nodes) ? p.nodes.join(' – ') : '';
    return [{ id, kind, nodes, value: partValue(p.value), modelText: modelText(p.model) }];
  });
}

/** Design JSON with one part per line: complete, but short enough to print. */
function compactDesignJson(content: unknown): string {
  if (!content || typeof content !== 'object' || Array.isArray(content)) return JSON.stringify(content, null, 2) ?? 'null';
  const lines = Object.entries(content as Record<string, unknown>).map(([key, value]) => {
    if (Array.isArray(value) && value.length > 0) return `  ${JSON.stringify(key)}: [\n${value.map((v) => `    ${JSON.stringify(v)}`).join(',\n')}\n  ]`;
    return `  ${JSON.stringify(key)}: ${JSON.stringify(value)}`;
  });
  return `{\n${lines.join(',\n')}\n}`;
}

const UNIT_BY_KIND: Record<string, string> = { resistor: 'Ω', R: 'Ω', capacitor: 'F', C: 'F', inductor: 'H', L: 'H' };

export function designBlocks(design: RecordDesign, record: Pick<RunRecord, 'build'>): Block[] {
  const parts = designParts(design.content);
  const actual = record.build.actualValues;
  const blocks: Block[] = [{ kind: 'heading', text: 'Design and build' }];
  blocks.push({
    kind: 'keyValues',
    rows: [
      ['Design', `${design.name}${design.id !== null ? ` (id ${design.id})` : ''}`],
      ['Build label', record.build.label],
      ['Build notes', record.build.notes || '—'],
      ['Build created', record.build.createdAt ?? '—'],
    ],
  });
  const partIds = new Set(parts.map((p) => p.id));
  const rows = parts.map((p) => {
    const unit = UNIT_BY_KIND[p.kind] ?? '';
    const measured = actual[p.id];
    const deviation = measured !== undefined && p.value ? `${formatFixed(((measured - p.value) / p.value) * 100, 2)} %` : '—';
    return [p.id, p.kind, p.nodes, p.modelText ?? formatMaybe(p.value, (v) => formatEngineering(v, unit)), measured === undefined ? '—' : formatEngineering(measured, unit), deviation];
  });
  for (const [id, value] of Object.entries(actual)) if (!partIds.has(id)) rows.push([id, '', '', '—', formatEngineering(value), '—']);
  if (rows.length > 0) blocks.push({ kind: 'table', caption: 'Parts: design values and the values measured on this build', columns: ['Part', 'Kind', 'Nodes', 'Design value or model', 'Actual value', 'Deviation'], rows });
  blocks.push({ kind: 'code', caption: 'Design file (JSON, including the op-amp model)', text: compactDesignJson(design.content) });
  return blocks;
}

function planBlocks(record: RunRecord): Block[] {
  const plan = record.run.plan;
  const unitFormat = record.run.kind === 'ac' ? formatHz : formatVolts;
  const amplitude = plan.amplitude.mode === 'fixed'
    ? `${SETTINGS.fixedAmplitude.label} ${formatEngineering(plan.amplitude.vpp, 'Vpp')}`
    : `${SETTINGS.automaticAmplitude.label}, ${SETTINGS.automaticAmplitude.explanation}${plan.amplitude.targetOutputVpp ? `; ${SETTINGS.targetOutput.label.toLowerCase()} ${formatEngineering(plan.amplitude.targetOutputVpp, 'Vpp')}` : ''}`;
  const limits = plan.limits;
  const limitText = limits
    ? [
        limits.maxDeviationDb !== undefined ? `|measured − theory| ≤ ${limits.maxDeviationDb} dB` : null,
        limits.cornerTolerance !== undefined ? `${FIGURE_NAMES.minus3dbHz} within ±${(limits.cornerTolerance * 100).toFixed(1)} %` : null,
        limits.passbandGainDb ? `pass-band gain ${formatDb(limits.passbandGainDb[0])} … ${formatDb(limits.passbandGainDb[1])}` : null,
      ].filter(Boolean).join('; ') || 'none'
    : 'none';
  return [
    { kind: 'heading', text: 'Plan' },
    {
      kind: 'keyValues',
      rows: [
        ['Sweep', `${unitFormat(plan.from)} to ${unitFormat(plan.to)}, ${plan.spacing === 'linear' ? `linear, ${plan.points ?? 'as many as the log grid'} points` : `log, ${plan.pointsPerDecade} points per decade`}`],
        ['Stimulus amplitude', amplitude],
        [`${SETTINGS.maxStimulus.label} in force`, plan.maxStimulusVpp !== undefined ? formatEngineering(plan.maxStimulusVpp, 'Vpp') : 'not recorded'],
        ['Output read by', `${plan.measurement}${plan.through ? ' (through calibration: the stage was bypassed)' : ''}`],
        ['Minimum cycles / averages', `${plan.minCycles} / ${plan.averages}`],
        [SETTINGS.refine.label, plan.refine ? 'yes' : 'no'],
        ['Limits', limitText],
        ['Run notes', record.run.notes || '—'],
      ],
    },
  ];
}

function figureBlocks(record: RunRecord): Block[] {
  const rows: Array<[string, string]> = figureLines(record.figures).map((line) => [line.label, line.value]);
  if (record.theory.gainLimitHz !== null) rows.push([`${FIGURE_NAMES.gainLimitHz}, theory`, formatHz(record.theory.gainLimitHz)]);
  if (record.theory.minus3dbHz.length > 0) rows.push([`${FIGURE_NAMES.minus3dbHz}, theory`, record.theory.minus3dbHz.map(formatHz).join(', ')]);
  if (record.dcFit) rows.push(['Fitted curve (plot)', record.dcFit.description]);
  return [{ kind: 'heading', text: 'Extracted figures' }, rows.length ? { kind: 'keyValues', rows } : { kind: 'paragraph', text: 'No figures were extracted from this run.' }];
}

function pointBlocks(record: RunRecord): Block[] {
  const p = record.points;
  const output = recordOutputV(p);
  const ac = record.run.kind === 'ac';
  const rows = p.step.map((step, i) => {
    const gain = formatMaybe(p.gainDb[i], (v) => formatMeasured(v, p.gainUncertaintyDb[i], 'dB'));
    const phase = formatMaybe(p.phaseDeg[i], (v) => formatMeasured(v, p.phaseUncertaintyDeg[i], '°'));
    const stimulus = formatMaybe(p.stimulus[i], ac ? formatHz : formatVolts);
    const amplitude = formatMaybe(p.stimulusSettingVpp[i], (v) => formatEngineering(v, 'Vpp'));
    return ac
      ? [String(step), stimulus, amplitude, gain, phase, flagWords(p.flags[i]), p.measuredAt[i]]
      : [String(step), stimulus, formatMaybe(output[i], formatVolts), flagWords(p.flags[i]), p.measuredAt[i]];
  });
  const columns = ac
    ? ['#', 'Frequency', 'Amplitude', 'Gain ± u', 'Phase ± u', 'Flags', 'Measured at']
    : ['#', 'Input', 'Output', 'Flags', 'Measured at'];
  return [
    { kind: 'heading', text: 'Points' },
    {
      kind: 'table',
      caption: ac ? 'u: the uncertainty stored with each point by the measurement.' : undefined,
      columns,
      rows,
      alignRight: columns.map((c) => c !== 'Flags' && c !== 'Measured at'),
    },
  ];
}

export function eventBlocks(record: Pick<RunRecord, 'events'>): Block[] {
  return [
    { kind: 'heading', text: 'Events and notes' },
    record.events.length
      ? { kind: 'table', columns: ['Time', 'Level', 'Message'], rows: record.events.map((e) => [e.at, e.level, e.message]) }
      : { kind: 'paragraph', text: 'No events were logged during this run.' },
  ];
}
