/**
 * Run records built from fixture data (handbook theory plus seeded noise, see
 * fixtures.ts): JSON validates against the shipped schema file and rebuilds the
 * record, CSV reads back to the same numbers, the digest pins the data.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildRunRecord, canonicalJson, readCsv, recordFromJson, renderRecord, runDigestInput } from '../../../app/record';
import { validateAgainstSchema } from '../../../app/record/schema-validator';
import { ValidationError } from '../../../app/errors';
import type { RunRecord } from '../../../app/record';
import { acRunDetail, fixtureBuild, FIXTURE_DESIGN } from './fixtures';

const GENERATED_AT = '2026-12-01T12:00:00.000Z';
const SCHEMA = JSON.parse(readFileSync(new URL('../../../app/record/record.schema.json', import.meta.url), 'utf8'));

function record(options: Parameters<typeof acRunDetail>[0] = {}): RunRecord {
  return buildRunRecord(acRunDetail(options), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: GENERATED_AT });
}

const text = async (r: RunRecord, format: 'csv' | 'json' | 'html') => new TextDecoder().decode((await renderRecord(r, format)).bytes);

describe('run record', () => {
  it('stores non-finite readings as null and keeps every point', () => {
    const r = record({ overrangeIndex: 5 });
    expect(r.points.gainDb[5]).toBeNull();
    expect(r.points.outputVPeak!.every((v) => v === null)).toBe(true);
    expect(r.points.step.length).toBe(41);
    expect(r.run.pointCount).toBe(41);
  });

  it('counts planned and refinement points apart, never more points "of" the plan than it has', async () => {
    // 10 Hz … 1 MHz at 8 a decade is 41 planned points; two refinement points near the corner are stored after them.
    const html = await text(record({ refinementHz: [950, 1100] }), 'html');
    expect(html).toContain('41 planned + 2 refinement');
    expect(html).not.toMatch(/43 of 41/);
    expect(await text(record(), 'html')).toContain('41 planned');
  });

  it('digest is SHA-256 of the documented canonical JSON (cross-checked with node:crypto)', () => {
    const r = record();
    const expected = createHash('sha256').update(canonicalJson(runDigestInput(r)), 'utf8').digest('hex');
    expect(r.digest.hex).toBe(expected);
    expect(r.digest.hex).toMatch(/^[0-9a-f]{64}$/);
  });

  it('digest changes when one point is altered, and not when only the export time changes', () => {
    const detail = acRunDetail();
    const context = { design: FIXTURE_DESIGN, build: fixtureBuild(), generatedAt: GENERATED_AT };
    const original = buildRunRecord(detail, context).digest.hex;
    const altered = structuredClone(detail);
    altered.points.gainDb[17] += 1e-9;
    expect(buildRunRecord(altered, context).digest.hex).not.toBe(original);
    const relabelled = buildRunRecord(detail, { ...context, build: fixtureBuild({ label: 'Board B' }) }).digest.hex;
    expect(relabelled).not.toBe(original);
    expect(buildRunRecord(detail, { ...context, generatedAt: '2030-01-01T00:00:00.000Z' }).digest.hex).toBe(original);
  });

  it('digest names the run by its stable id: new row ids (a copy to another store) keep it, another uid changes it', () => {
    const detail = acRunDetail({ offlinePeriods: [{ from: '2026-11-30T10:01:00.000Z', to: '2026-11-30T10:02:00.000Z' }] });
    const context = { design: FIXTURE_DESIGN, designId: 1, designUid: 'e1f2a3b4-c5d6-4e7f-8a9b-0c1d2e3f4a5b', build: fixtureBuild(), generatedAt: GENERATED_AT };
    const original = buildRunRecord(detail, context);
    expect(original.run.offlinePeriods).toEqual(detail.offlinePeriods);
    expect(original.digest.method).toContain('rolloff-run-digest-2');
    // The same run with every row id different, as `rolloff store copy` stores it elsewhere.
    const copied = { ...structuredClone(detail), id: 901, buildId: 77, request: { ...detail.request, buildId: 77 } };
    const copiedRecord = buildRunRecord(copied, { ...context, designId: 55, build: fixtureBuild({ id: 77, designId: 55 }) });
    expect(copiedRecord.digest.hex).toBe(original.digest.hex);
    expect(buildRunRecord({ ...detail, uid: '00000000-0000-4000-8000-000000000001' }, context).digest.hex).not.toBe(original.digest.hex);
    expect(buildRunRecord(detail, { ...context, designUid: '00000000-0000-4000-8000-000000000002' }).digest.hex).not.toBe(original.digest.hex);
    // Offline periods say how the points travelled, not what was measured: not hashed.
    expect(buildRunRecord({ ...detail, offlinePeriods: [] }, context).digest.hex).toBe(original.digest.hex);
  });

  it('a record exported before stable ids (digest version 1) still reads back and verifies', () => {
    const r = structuredClone(record()) as RunRecord & { run: { uid?: string }; build: { uid?: string }; design: { uid?: string | null } };
    delete r.run.uid;
    delete r.run.offlinePeriods;
    delete r.build.uid;
    delete r.design.uid;
    // Version 1 as DIGEST.md describes it, computed here independently of app/record/digest.ts.
    const v1 = {
      digest: 'rolloff-run-digest-1',
      run: { id: r.run.id, kind: r.run.kind, startedAt: r.run.startedAt, endedAt: r.run.endedAt, simulated: r.run.simulated, plan: r.run.plan },
      build: { id: r.build.id, label: r.build.label, actualValues: r.build.actualValues },
      design: { name: r.design.name },
      instruments: r.bench.map(({ role, address, profileId, simulated, identity }) => ({ role, address, profileId, simulated, identity })),
      points: r.points,
    };
    r.digest = { ...r.digest, method: 'SHA-256 … {"digest":"rolloff-run-digest-1", …}', hex: createHash('sha256').update(canonicalJson(v1), 'utf8').digest('hex') };
    expect(recordFromJson(JSON.stringify(r), 'old.json')).toEqual(r);
    r.points.gainDb[0] = (r.points.gainDb[0] ?? 0) + 1;
    expect(() => recordFromJson(JSON.stringify(r), 'old.json')).toThrow(/digest: does not match/);
  });

  it('JSON validates against app/record/record.schema.json and rebuilds the same record', async () => {
    const r = record({ overrangeIndex: 3 });
    const json = await text(r, 'json');
    expect(validateAgainstSchema(JSON.parse(json), SCHEMA)).toEqual([]);
    const rebuilt = recordFromJson(json, 'run.json');
    expect(rebuilt).toEqual(r);
    // Rebuilt means every other format comes out byte for byte the same.
    expect(await text(rebuilt as RunRecord, 'html')).toBe(await text(r, 'html'));
    expect(await text(rebuilt as RunRecord, 'csv')).toBe(await text(r, 'csv'));
  });

  it('a JSON record with an altered number is refused (digest) and a broken one names the field (schema)', async () => {
    const r = record();
    const parsed = JSON.parse(await text(r, 'json'));
    parsed.points.gainDb[4] = parsed.points.gainDb[4] + 0.5;
    expect(() => recordFromJson(JSON.stringify(parsed), 'run.json')).toThrow(/run\.json run 12\.digest: does not match/);
    const broken = JSON.parse(await text(r, 'json'));
    broken.points.flags[2] = 'overrange';
    expect(() => recordFromJson(JSON.stringify(broken), 'run.json')).toThrow(ValidationError);
    expect(() => recordFromJson(JSON.stringify(broken), 'run.json')).toThrow(/points\/flags\/2/);
    expect(() => recordFromJson('{"recordType":', 'run.json')).toThrow(/not valid JSON/);
  });

  it('DIGEST.md\'s recipe, followed by hand on the JSON text, gives the record\'s digest, and it names every point key', async () => {
    const json = JSON.parse(await text(record(), 'json'));
    const { run, build, design, bench, points } = json;
    // The object of DIGEST.md step 1, built from the file without the project's own helper.
    const { buildId: _buildId, ...plan } = run.plan;
    const input = {
      digest: 'rolloff-run-digest-2',
      run: { uid: run.uid, kind: run.kind, startedAt: run.startedAt, endedAt: run.endedAt, simulated: run.simulated, plan },
      build: { uid: build.uid, label: build.label, actualValues: build.actualValues },
      design: { uid: design.uid, name: design.name },
      instruments: bench.map((i: Record<string, unknown>) => ({ role: i.role, address: i.address, profileId: i.profileId, simulated: i.simulated, identity: i.identity })),
      points,
    };
    expect(createHash('sha256').update(canonicalJson(input), 'utf8').digest('hex')).toBe(json.digest.hex);
    const digestMd = readFileSync(new URL('../../../app/record/DIGEST.md', import.meta.url), 'utf8');
    expect(digestMd).toContain(`"digest": "${input.digest}"`);
    expect(Object.keys(points)).toHaveLength(10);
    for (const key of Object.keys(points)) expect(digestMd, key).toContain(key);
  });

  it('names the point columns for what they hold (format 2), and refuses an output key that does not fit the run', async () => {
    const json = JSON.parse(await text(record(), 'json'));
    expect(json.formatVersion).toBe(2);
    expect(Object.keys(json.points)).toEqual(expect.arrayContaining(['stimulusSettingVpp', 'outputVPeak']));
    expect(Object.keys(json.points)).not.toEqual(expect.arrayContaining(['amplitudeVpp']));
    expect(() => recordFromJson(JSON.stringify({ ...json, formatVersion: 3 }), 'new.json')).toThrow(/new\.json\.formatVersion: is 3; this Rolloff reads formats 1 and 2/);
    // A scope run whose output is filed under the meter's key is refused, not misread.
    const { outputVPeak, ...others } = json.points;
    expect(() => recordFromJson(JSON.stringify({ ...json, points: { ...others, outputVRms: outputVPeak } }), 'moved.json')).toThrow(/moved\.json run 12\.points: has no outputVPeak/);
  });

  it('a format-1 file (amplitudeVpp, outputV) still verifies, renders like its format-2 twin, and is written back as it was', async () => {
    const current = record();
    const json = JSON.parse(await text(current, 'json'));
    // Format 1 as it was written: the same points under their old keys, and the digest over them (DIGEST.md).
    const { stimulusSettingVpp, outputVPeak, ...same } = json.points;
    const oldPoints = { step: same.step, stimulus: same.stimulus, amplitudeVpp: stimulusSettingVpp, gainDb: same.gainDb, gainUncertaintyDb: same.gainUncertaintyDb, phaseDeg: same.phaseDeg, phaseUncertaintyDeg: same.phaseUncertaintyDeg, outputV: outputVPeak, flags: same.flags, measuredAt: same.measuredAt };
    const { buildId: _buildId, ...plan } = json.run.plan;
    const input = {
      digest: 'rolloff-run-digest-2',
      run: { uid: json.run.uid, kind: json.run.kind, startedAt: json.run.startedAt, endedAt: json.run.endedAt, simulated: json.run.simulated, plan },
      build: { uid: json.build.uid, label: json.build.label, actualValues: json.build.actualValues },
      design: { uid: json.design.uid, name: json.design.name },
      instruments: json.bench.map((i: Record<string, unknown>) => ({ role: i.role, address: i.address, profileId: i.profileId, simulated: i.simulated, identity: i.identity })),
      points: oldPoints,
    };
    const formatOne = { ...json, formatVersion: 1, points: oldPoints, digest: { ...json.digest, hex: createHash('sha256').update(canonicalJson(input), 'utf8').digest('hex') } };
    const fileText = JSON.stringify(formatOne, null, 2) + '\n';
    const read = recordFromJson(fileText, 'old.json') as RunRecord;
    expect(read.points).toEqual(current.points);
    expect(await text(read, 'csv')).toBe(await text(current, 'csv'));
    expect(await text(read, 'json')).toBe(fileText);
    const altered = structuredClone(formatOne);
    altered.points.outputV[3] = 1;
    expect(() => recordFromJson(JSON.stringify(altered), 'old.json')).toThrow(/digest: does not match/);
  });

  it('the schema file rejects what it should (guards against a schema that accepts anything)', async () => {
    const parsed = JSON.parse(await text(record(), 'json'));
    for (const mutate of [
      (x: any) => delete x.digest,
      (x: any) => (x.run.kind = 'rf'),
      (x: any) => (x.digest.hex = 'ABC'),
      (x: any) => (x.bench[0].identity.serial = 'x'),
      (x: any) => (x.points.gainDb[0] = '20'),
    ]) {
      const copy = structuredClone(parsed);
      mutate(copy);
      expect(validateAgainstSchema(copy, SCHEMA).length).toBeGreaterThan(0);
    }
  });

  it('CSV (RFC 4180) reads back to the same numbers, with units in the header', async () => {
    const r = record({ overrangeIndex: 5 });
    const csv = await text(r, 'csv');
    expect(csv.endsWith('\r\n')).toBe(true);
    expect(csv.split('\r\n')).toHaveLength(r.points.step.length + 2);
    const [header, ...rows] = readCsv(csv, 'run.csv');
    expect(header).toEqual(['run_id', 'build_label', 'step', 'frequency_hz', 'stimulus_setting_vpp', 'gain_db', 'gain_uncertainty_db', 'phase_deg', 'phase_uncertainty_deg', 'output_v_peak', 'flags', 'flag_names', 'measured_at']);
    const column = (name: string) => rows.map((row) => row[header.indexOf(name)]);
    const asNumbers = (name: string) => column(name).map((cell) => (cell === '' ? null : Number(cell)));
    expect(asNumbers('frequency_hz')).toEqual(r.points.stimulus);
    expect(asNumbers('gain_db')).toEqual(r.points.gainDb);
    expect(asNumbers('phase_deg')).toEqual(r.points.phaseDeg);
    expect(asNumbers('gain_uncertainty_db')).toEqual(r.points.gainUncertaintyDb);
    expect(asNumbers('flags')).toEqual(r.points.flags);
    expect(column('measured_at')).toEqual(r.points.measuredAt);
    expect(column('flag_names')[5]).toContain('overrange');
    expect(new Set(column('build_label'))).toEqual(new Set(['Board A (hand-wired)']));
  });

  it('refuses inconsistent service data with a located error', () => {
    const detail = acRunDetail();
    detail.points.phaseDeg.pop();
    expect(() => buildRunRecord(detail, { design: FIXTURE_DESIGN, build: fixtureBuild() })).toThrow(/run 12\.points\.phaseDeg: has 40 values where 41 were expected/);
    expect(() => buildRunRecord(acRunDetail(), { design: FIXTURE_DESIGN, build: fixtureBuild({ id: 99 }) })).toThrow(/belongs to build 3/);
  });

  it('file names are safe and say what the record is', async () => {
    const r = buildRunRecord(acRunDetail(), { design: FIXTURE_DESIGN, build: fixtureBuild({ label: '../../etc/pässwd <A>' }), generatedAt: GENERATED_AT });
    const { fileName, mimeType } = await renderRecord(r, 'csv');
    expect(fileName).toBe('rolloff-run-12-etc-passwd-A.csv');
    expect(mimeType).toMatch(/^text\/csv/);
    await expect(renderRecord(r, 'docx' as never)).rejects.toThrow(/not a record format/);
  });
});
