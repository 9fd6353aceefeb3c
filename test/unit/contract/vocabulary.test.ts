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
import { FIGURE_NAMES, FLAG_WORDS, RETIRED_FIGURE_NAMES, RETIRED_SETTING_NAMES, pointCountText, summaryPointCountText } from '../../../app/contract/vocabulary';
import { PointFlag } from '../../../app/contract/contract';
import { buildRunRecord, renderRecord } from '../../../app/record';
import { acRunDetail, dcRunDetail, fixtureBuild, FIXTURE_DESIGN, LOG_STAGE_DESIGN } from '../record/fixtures';
import { runDetailText } from '../../../app/cli/sweep/summary-text';


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
