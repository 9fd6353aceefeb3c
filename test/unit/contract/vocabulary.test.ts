/**
 * One name per figure and setting (app/contract/vocabulary.ts): every command's
 * help, the window's label strings (renderer sources) and a record's headings
 * are read, and a name the table retired, or an internal flag key, fails.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { COMMANDS } from '../../../app/cli/commands';
import { formatCommandHelp } from '../../../app/cli/args';
import { BENCH_WORDS, FIGURE_NAMES, FLAG_WORDS, SETTINGS, RETIRED_FIGURE_NAMES, RETIRED_SETTING_NAMES, pointCountText, summaryPointCountText } from '../../../app/contract/vocabulary';
import { PointFlag } from '../../../app/contract/contract';
import { buildRunRecord, renderRecord } from '../../../app/record';
import { acRunDetail, dcRunDetail, fixtureBuild, FIXTURE_DESIGN, LOG_STAGE_DESIGN } from '../record/fixtures';
import { runDetailText } from '../../../app/cli/sweep/summary-text';
import { figureRows } from '../../../renderer/model/figure-rows';
import type { RunDetail } from '../../../app/contract/contract';


const ROOT = new URL('../../../', import.meta.url).pathname;

function sourcesUnder(folder: string): string[] {
  return readdirSync(folder).flatMap((name) => {
    const path = join(folder, name);
    if (statSync(path).isDirectory()) return sourcesUnder(path);
    return /\.(ts|html)$/.test(name) ? [path] : [];
  });
}

const RETIRED = [...Object.keys(RETIRED_FIGURE_NAMES), ...RETIRED_SETTING_NAMES];

function retiredIn(text: string): string[] {
  return RETIRED.filter((name) => text.includes(name));
}

describe('one vocabulary', () => {
  it('every command\'s help uses the table\'s names', () => {
    const problems = COMMANDS.flatMap((command) => retiredIn(formatCommandHelp(command)).map((name) => `${command.name}: ${name}`));
    expect(COMMANDS.length).toBeGreaterThan(10);
    expect(problems).toEqual([]);
  });

  it('the window\'s label strings and the record sources use the table\'s names', () => {
    const files = [...sourcesUnder(join(ROOT, 'renderer')), ...sourcesUnder(join(ROOT, 'app/record')), ...sourcesUnder(join(ROOT, 'app/cli'))];
    const problems = files.flatMap((file) => retiredIn(readFileSync(file, 'utf8')).map((name) => `${file.slice(ROOT.length)}: ${name}`));
    expect(files.length).toBeGreaterThan(30);
    expect(problems).toEqual([]);
  });

  it('a record\'s text uses the table\'s figure names and flag words', async () => {
    const record = buildRunRecord(acRunDetail(), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: '2026-12-01T12:00:00.000Z' });
    const html = new TextDecoder().decode((await renderRecord(record, 'html')).bytes);
    expect(retiredIn(html)).toEqual([]);
    expect(html).toContain(FIGURE_NAMES.minus3dbHz);
    expect(html).toContain(FIGURE_NAMES.gainLimitHz);
    expect(html).not.toMatch(/pastGainLimit|notANumber|outsideToleranceBand/);
    expect(Object.values(FLAG_WORDS).some((word) => html.includes(word))).toBe(true);
    // Slew rate in the trade's unit (the fixture's op-amp: 0.5e6 V/s in the design file), A0 as a plain ratio.
    expect(html).toContain('SR 0.5 V/µs');
    expect(html).toContain('A0 100000');
    expect(html).not.toMatch(/\d V\/s\b|kV\/s/);
  });
});

/**
 * Spellings of the table's names that people (and earlier versions) wrote: each
 * pattern, found in any text a person reads, fails with the table's name beside
 * it. Matched case-insensitively, so "Pass band gain" and "pass band gain" are
 * both caught; the table's own spelling never matches its pattern.
 */
const VARIANT_SPELLINGS: Array<[RegExp, string]> = [
  [/\bpass ?band gain/i, FIGURE_NAMES.passbandGainDb],
  [/(?<![−\w])-3 ?dB|\b3dB\b|−3dB/, FIGURE_NAMES.minus3dbHz],
  [/\bgain limit point|\bgain-limit frequency/i, FIGURE_NAMES.gainLimitHz],
  [/\broll off\b|\brolloff (?:rate|slope)/i, FIGURE_NAMES.rolloffDbPerDecade],
  [/\bGBW est\b|\bestimated GBW/i, FIGURE_NAMES.gbwEstimateHz],
  [/\bmax(?:imum)? deviation\b/i, FIGURE_NAMES.maxDeviationDb],
  [/\bideality n\b|\bemission coefficient|\blog fit\b/i, FIGURE_NAMES.diodeIdealityN],
  [/\bI_S\b|\bIs = /, FIGURE_NAMES.diodeSaturationCurrentA],
  [/\bR_S\b|\bRs = /, FIGURE_NAMES.diodeSeriesResistanceOhm],
  [/\bphase margin (?:from|estimated)|\bPM estimate/i, FIGURE_NAMES.phaseMarginEstimateDeg],
  [/^Peaking\b|\bpeaking \(measured/im, FIGURE_NAMES.closedLoopPeakingDb],
  [/\(computed [^)]*\d/, 'theoryAside(): "(theory X)"'],
  [/\bphysical (?:instruments|bench)\b|\bhardware bench\b/i, `${BENCH_WORDS.real} / ${BENCH_WORDS.simulated}`],
  [/\bmax(?:imum)?[- ]amplitude\b|\bstimulus ceiling\b|\bbench maximum\b/i, `${SETTINGS.maxStimulus.label} (--${SETTINGS.maxStimulus.cliOption})`],
  [/\bV ?peak-to-peak\b|\bVp-p\b|\bVpk-pk\b/, SETTINGS.maxStimulus.unit],
  [/\brefine(?:ment)? near corners\b|\bRefine −3 dB/i, SETTINGS.refine.label],
  [/\b\d+\/\d+ points?\b|\b\d+ of \d+ points\b/, 'pointCountText(): "41 planned + 2 refinement"'],
];

function variantsIn(where: string, text: string): string[] {
  return VARIANT_SPELLINGS.flatMap(([pattern, name]) => {
    const found = pattern.exec(text);
    return found ? [`${where}: "${found[0]}" (the table says ${name})`] : [];
  });
}

const TABLE_NAMES = new Set<string>(Object.values(FIGURE_NAMES));

/** An AC run with every figure the extraction can give, so every label is rendered. */
function acRunWithEveryFigure(): RunDetail {
  const detail = acRunDetail();
  return {
    ...detail,
    figures: {
      ...detail.figures,
      closedLoopPeakingDb: 1.25,
      theoryPeakingDb: 1.1,
      phaseMarginEstimateDeg: 58.2,
      theoryPhaseMarginDeg: 60.4,
      phaseMarginEstimateIsLowerBound: false,
      theoryWarnings: ['U1: phase margin 40.0° below 45° (invented)'],
    },
  };
}

/** The CLI summary's figure lines: "Label<two or more spaces>value", after the blank line. */
function cliFigureLabels(text: string): string[] {
  const figures = text.split('\n\n')[1] ?? '';
  return figures.split('\n').filter((line) => line !== '' && !line.startsWith('verdict') && !line.startsWith('  ')).map((line) => line.split(/\s{2,}/)[0]);
}

/** The labels of a record's "Extracted figures" table (HTML). */
function recordFigureLabels(html: string): string[] {
  const table = /Extracted figures<\/h\d>\s*<table class="kv">([\s\S]*?)<\/table>/.exec(html)?.[1] ?? '';
  return [...table.matchAll(/<th>([^<]*)<\/th>/g)].map((m) => m[1].replace(/&amp;/g, '&'));
}

describe('names as rendered: every figure label is one of the table\'s, and no text spells a table name another way', () => {
  const ac = acRunWithEveryFigure();
  const { detail: dc, build: dcBuild, dcFit } = dcRunDetail();
  const dcRecord = () => buildRunRecord(dc, { design: LOG_STAGE_DESIGN, build: dcBuild, dcFit, generatedAt: '2026-12-01T12:00:00.000Z' });
  const acRecord = () => buildRunRecord(ac, { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: '2026-12-01T12:00:00.000Z' });
  // Labels beside the figures that are no figure: the build's diode model in the CLI, the record's theory rows and fitted curve.
  const notFigures = new Set(['Theory (build)', 'Fitted curve (plot)', ...Object.values(FIGURE_NAMES).map((name) => `${name}, theory`)]);

  it('the CLI summary of an AC and a DC run', () => {
    const texts = [runDetailText(ac), runDetailText(dc, { n: 1.8, isA: 2.5e-9, rsOhm: 8 })];
    const labels = texts.flatMap(cliFigureLabels);
    expect(labels).toEqual(expect.arrayContaining([FIGURE_NAMES.closedLoopPeakingDb, FIGURE_NAMES.phaseMarginEstimateDeg, FIGURE_NAMES.diodeIdealityN, FIGURE_NAMES.diodeSaturationCurrentA]));
    expect(labels.filter((label) => !TABLE_NAMES.has(label) && !notFigures.has(label))).toEqual([]);
    expect(texts.flatMap((text, i) => variantsIn(['AC summary', 'DC summary'][i], text))).toEqual([]);
  });

  it('the Sweep view\'s figure rows of an AC and a DC run', () => {
    const rows = [...figureRows(ac.figures), ...figureRows(dc.figures)];
    expect(rows.length).toBeGreaterThan(8);
    expect(rows.map(([label]) => label).filter((label) => !TABLE_NAMES.has(label))).toEqual([]);
    expect(rows.flatMap(([label, value]) => variantsIn(`window ${label}`, `${label}\n${value}`))).toEqual([]);
  });

  it('the HTML records of an AC and a DC run', async () => {
    for (const [name, record] of [['AC record', acRecord()], ['DC record', dcRecord()]] as const) {
      const html = new TextDecoder().decode((await renderRecord(record, 'html')).bytes);
      const labels = recordFigureLabels(html);
      expect(labels.length, name).toBeGreaterThan(2);
      expect(labels.filter((label) => !TABLE_NAMES.has(label) && !notFigures.has(label)), name).toEqual([]);
      expect(variantsIn(name, htmlText(html))).toEqual([]);
    }
  });

  it('every command\'s --help and the window\'s string literals', () => {
    const help = COMMANDS.flatMap((command) => variantsIn(`${command.name} --help`, formatCommandHelp(command)));
    expect(help).toEqual([]);
    // Strings a view shows: quoted literals of the renderer's sources (comments left out).
    const files = sourcesUnder(join(ROOT, 'renderer')).filter((file) => file.endsWith('.ts'));
    const literals = files.flatMap((file) => {
      const code = readFileSync(file, 'utf8').replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
      return [...code.matchAll(/'([^'\n]*)'|`([^`]*)`/g)].map((m) => ({ file: file.slice(ROOT.length), text: m[1] ?? m[2] }));
    });
    expect(literals.length).toBeGreaterThan(300);
    expect(literals.flatMap(({ file, text }) => variantsIn(file, text))).toEqual([]);
  });
});

describe('a run\'s point count in words (CLI, Sweep view, records)', () => {
  // Flags as a sweep stores them: the planned grid first, refinement points after it. Counts worked by hand — common practice, no source.
  const planned = (n: number, flags = 0) => Array.from({ length: n }, () => flags);
  it('tells planned and refinement points apart, however many points there are', () => {
    expect(pointCountText(41, planned(41))).toBe('41 planned');
    expect(pointCountText(41, [...planned(41), ...planned(2, PointFlag.refinement)])).toBe('41 planned + 2 refinement');
    expect(pointCountText(13, [...planned(13, PointFlag.distorted), PointFlag.refinement | PointFlag.retried])).toBe('13 planned + 1 refinement');
  });
  it('a run summary (two counts, no flags) says the same as the points', () => {
    expect(summaryPointCountText(41, 43)).toBe(pointCountText(41, [...planned(41), ...planned(2, PointFlag.refinement)]));
    expect(summaryPointCountText(41, 20)).toBe('20 of 41 planned');
    expect(summaryPointCountText(10, 10)).toBe('10 planned');
  });
  it('says how far a run that stopped early got', () => {
    expect(pointCountText(41, planned(20))).toBe('20 of 41 planned');
    expect(pointCountText(41, [])).toBe('0 of 41 planned');
  });
});

/**
 * A hyphen-minus written as a sign: "-" before a digit that does not follow a letter, digit or dot
 * (so dates such as 2026-12-01, SHA-256 and serial numbers are not taken for numbers).
 */
const ASCII_MINUS = /(?<![\p{L}\p{N}.])-(?=\.?\d)/gu;

/** The text a person reads in an HTML record: no tags, and without the design file's JSON. */
function htmlText(html: string): string {
  return html.replace(/<pre[\s\S]*?<\/pre>/g, ' ').replace(/<style[\s\S]*?<\/style>/g, ' ').replace(/<[^>]+>/g, ' ');
}

function asciiMinusesIn(text: string): string[] {
  return [...text.matchAll(ASCII_MINUS)].map((m) => text.slice(Math.max(0, m.index - 20), m.index + 12));
}

describe('numbers for people write the true minus "−" (U+2212), machine formats ASCII "-"', () => {
  it('the HTML records of an AC run (negative phase and roll-off) and a DC run (negative output)', async () => {
    const { detail, build, dcFit } = dcRunDetail();
    const records = [
      buildRunRecord(acRunDetail(), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: '2026-12-01T12:00:00.000Z' }),
      buildRunRecord(detail, { design: LOG_STAGE_DESIGN, build, dcFit, generatedAt: '2026-12-01T12:00:00.000Z' }),
    ];
    for (const record of records) {
      const text = htmlText(new TextDecoder().decode((await renderRecord(record, 'html')).bytes));
      expect(text).toContain('−');
      expect(asciiMinusesIn(text)).toEqual([]);
      // The same record's CSV keeps ASCII for programs.
      const csv = new TextDecoder().decode((await renderRecord(record, 'csv')).bytes);
      expect(csv).toMatch(/,-\d/);
      expect(csv).not.toContain('−');
    }
  });

  it('the terminal summary of a run', () => {
    const text = runDetailText(acRunDetail());
    expect(text).toMatch(/Roll-off\s+−\d/);
    expect(asciiMinusesIn(text)).toEqual([]);
  });
});
