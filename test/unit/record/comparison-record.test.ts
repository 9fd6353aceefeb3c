/** Comparison records from fixture runs (handbook theory plus seeded noise, see fixtures.ts). */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildComparisonRecord, readCsv, recordFromJson, renderRecord, sha256Hex, canonicalJson } from '../../../app/record';
import type { ComparisonRecord } from '../../../app/record';
import { validateAgainstSchema } from '../../../app/record/schema-validator';
import { comparisonFixture, dcRunDetail, LOG_STAGE_DESIGN } from './fixtures';

const SCHEMA = JSON.parse(readFileSync(new URL('../../../app/record/record.schema.json', import.meta.url), 'utf8'));
const GENERATED_AT = '2026-12-01T12:00:00.000Z';

function comparisonRecord(reference: number | 'theory' = 12): ComparisonRecord {
  const { comparison, contexts } = comparisonFixture(reference);
  return buildComparisonRecord(comparison, { runs: contexts, generatedAt: GENERATED_AT });
}

const text = async (r: ComparisonRecord, format: 'csv' | 'json' | 'html') => new TextDecoder().decode((await renderRecord(r, format)).bytes);

describe('comparison record', () => {
  it('holds both runs with their own digests and a digest over them (DIGEST.md)', () => {
    const r = comparisonRecord();
    expect(r.runs.map((run) => run.run.id)).toEqual([12, 15]);
    expect(r.runs[0].digest.hex).not.toBe(r.runs[1].digest.hex);
    // Version 2 names the reference run by its stable id, so a copy to another store (new row ids) keeps the digest.
    const expected = sha256Hex(canonicalJson({ digest: 'rolloff-comparison-digest-2', reference: r.runs.find((run) => run.run.id === 12)!.run.uid, runs: r.runs.map((run) => run.digest.hex) }));
    expect(r.digest.hex).toBe(expected);
    expect(comparisonRecord('theory').digest.hex).not.toBe(r.digest.hex);
  });

  it('JSON validates against the schema file and rebuilds the same record', async () => {
    for (const reference of [12, 'theory'] as const) {
      const r = comparisonRecord(reference);
      const json = await text(r, 'json');
      expect(validateAgainstSchema(JSON.parse(json), SCHEMA)).toEqual([]);
      expect(recordFromJson(json, 'comparison.json')).toEqual(r);
    }
  });

  it('a member run altered inside the JSON is caught', async () => {
    const parsed = JSON.parse(await text(comparisonRecord(), 'json'));
    parsed.runs[1].points.stimulus[0] = 11;
    expect(() => recordFromJson(JSON.stringify(parsed), 'comparison.json')).toThrow(/run 15\.digest/);
  });

  it('CSV has every run\'s points and the difference from the reference, reading back to the same numbers', async () => {
    const r = comparisonRecord(12);
    const [header, ...rows] = readCsv(await text(r, 'csv'));
    expect(header.at(-1)).toBe('delta_from_reference_db');
    expect(rows).toHaveLength(r.runs[0].points.step.length + r.runs[1].points.step.length);
    const runB = rows.filter((row) => row[0] === '15');
    expect(runB.map((row) => Number(row[header.indexOf('delta_from_reference_db')]))).toEqual(r.differences[1].deltaDb);
    // The reference run differs from itself by exactly zero (measured − measured).
    expect(rows.filter((row) => row[0] === '12').every((row) => Number(row.at(-1)) === 0)).toBe(true);
  });

  it('HTML shows the overlay and difference plots and the figure table with deltas', async () => {
    const html = await text(comparisonRecord(12), 'html');
    expect(html).toContain('Overlay: gain');
    expect(html).toContain('Difference from run 12');
    expect((html.match(/<svg /g) ?? []).length).toBe(2);
    expect(html).toContain('Board B (PCB rev 2)');
    expect(html).toMatch(/Δ is the figure minus the same figure of the run 12/);
  });

  it('refuses a reference that is not among the runs, and a run without its build', () => {
    const { comparison, contexts } = comparisonFixture(12);
    expect(() => buildComparisonRecord({ ...comparison, referenceRunId: 99 }, { runs: contexts })).toThrow(/run 99 is not among the compared runs/);
    const dc = dcRunDetail();
    const mixed = { ...comparison, runs: [comparison.runs[0], dc.detail] };
    const mixedContexts = new Map([...contexts, [dc.detail.id, { design: LOG_STAGE_DESIGN, build: dc.build }]]);
    expect(() => buildComparisonRecord(mixed, { runs: mixedContexts })).toThrow(/AC sweeps and DC transfers cannot share one plot/);
    contexts.delete(15);
    expect(() => buildComparisonRecord(comparison, { runs: contexts })).toThrow(/comparison\.runs\[15\]: the design and build/);
  });
});
