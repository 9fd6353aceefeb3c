/**
 * A noise run's record in every format. The density's expected level is white
 * noise's √(2σ²/fs) (Heinzel, Rüdiger, Schilling 2002, §9) for the fixture's
 * invented white records (noise-fixtures.ts); the JSON passes the record
 * schema (JSON Schema 2020-12, @cfworker/json-schema) and its digest pins the
 * measurement (DIGEST.md); the CSV columns are the ones rolloff theory --noise
 * writes, then the uncertainty columns.
 */
import { describe, expect, it } from 'vitest';
import { buildNoiseRunRecord, readCsv, recordFromJson, recordToJson, renderRecord } from '../../../app/record';
import { FIGURE_NAMES, NOISE_COLUMNS } from '../../../app/contract/vocabulary';
import { CURVE_NAMES, PLOT_PALETTE } from '../../../app/contract/plot-palette';
import { noisePlots } from '../../../app/record/record-plots';
import { fixtureBuild, FIXTURE_DESIGN } from './fixtures';
import { noiseRunFixture, WHITE_DENSITY_V_PER_RTHZ } from './noise-fixtures';

const GENERATED_AT = '2026-12-01T12:00:00.000Z';
const record = (measurement: 'scope' | 'meter' = 'scope') =>
  buildNoiseRunRecord(noiseRunFixture({ measurement }), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: GENERATED_AT });
const text = async (format: 'csv' | 'html' | 'json', measurement: 'scope' | 'meter' = 'scope') => new TextDecoder().decode((await renderRecord(record(measurement), format)).bytes);

describe('noise run record', () => {
  it('carries the band\'s density with its uncertainty beside the computed one, at the white-noise level', () => {
    const r = record();
    expect(r.recordType).toBe('noise-run');
    expect(r.title).toBe('Output noise of Board A (hand-wired) (run 31)');
    const { density } = r;
    expect(density.frequencyHz[0]).toBeGreaterThanOrEqual(200);
    expect(density.frequencyHz.at(-1)).toBeLessThanOrEqual(10e3);
    const meanRatio = density.measuredVPerRtHz.reduce<number>((sum, d) => sum + (d ?? Number.NaN) / WHITE_DENSITY_V_PER_RTHZ, 0) / density.measuredVPerRtHz.length;
    // ~98 bins of ν ≈ 50 each: the mean ratio is known to about 0.1/√98 · (correlation) ≈ 1.5 %; allow 5 %.
    expect(Math.abs(meanRatio - 1)).toBeLessThan(0.05);
    expect(r.figures!.computedRmsV).toBeGreaterThan(0);
  });

  it('JSON: passes the record schema, reads back identical, and its digest finds an altered measurement but not the computed density', async () => {
    const json = await text('json');
    const back = recordFromJson(json, 'noise.json');
    expect(back).toEqual(record());
    const altered = JSON.parse(json);
    altered.density.measuredVPerRtHz[3] *= 1.01;
    expect(() => recordFromJson(JSON.stringify(altered), 'altered.json')).toThrow(/digest.*does not match/);
    const recomputed = JSON.parse(json);
    recomputed.density.computedVPerRtHz[3] *= 1.01; // derived from the design, not hashed (DIGEST.md)
    expect(() => recordFromJson(JSON.stringify(recomputed), 'recomputed.json')).not.toThrow();
    const shortened = JSON.parse(json);
    shortened.density.low95VPerRtHz.pop();
    expect(() => recordFromJson(JSON.stringify(shortened), 'short.json')).toThrow(/density.low95VPerRtHz: has \d+ values where \d+ were expected/);
    const misnamed = JSON.parse(json);
    misnamed.run.plan.window = 'flat-top';
    expect(() => recordFromJson(JSON.stringify(misnamed), 'misnamed.json')).toThrow(/record schema/);
  });

  it('CSV: frequency_hz,noise_v_per_rthz first, then the uncertainty, the 95 % interval and the computed density', async () => {
    const [header, ...rows] = readCsv(await text('csv'));
    expect(header).toEqual(['frequency_hz', 'noise_v_per_rthz', 'noise_uncertainty_v_per_rthz', 'noise_low95_v_per_rthz', 'noise_high95_v_per_rthz', 'computed_noise_v_per_rthz']);
    expect(header).toEqual(Object.values(NOISE_COLUMNS));
    const r = record();
    expect(rows).toHaveLength(r.density.frequencyHz.length);
    expect(Number(rows[5][1])).toBe(r.density.measuredVPerRtHz[5]);
    expect(Number(rows[5][2])).toBe(r.density.uncertaintyVPerRtHz[5]);
    expect(Number(rows[5][5])).toBe(WHITE_DENSITY_V_PER_RTHZ);
  });

  it('CSV of a meter noise run: its readings', async () => {
    const [header, ...rows] = readCsv(await text('csv', 'meter'));
    expect(header).toEqual(['step', 'output_v_rms', 'flags', 'flag_names', 'measured_at']);
    expect(rows).toHaveLength(4);
  });

  it('HTML: the density plot and the figures under the table\'s names', async () => {
    const html = await text('html');
    expect(html).toContain('Output noise density');
    expect(html).toContain('<svg');
    for (const name of [FIGURE_NAMES.noiseMeasuredRmsV, FIGURE_NAMES.noiseComputedRmsV, FIGURE_NAMES.noiseShareWithin95]) expect(html).toContain(name);
    expect(html).toContain(`${CURVE_NAMES.theory} (actual circuit)`);
    expect(html).toContain(CURVE_NAMES.measuredInterval);
    expect(html).toContain('held off');
  });

  it('draws the density in the one palette: measured orange with its interval, the computed density in theory\'s blue', () => {
    const [plot] = noisePlots(record());
    expect(plot.series.map((s) => [s.name, s.color])).toEqual([[CURVE_NAMES.measured, PLOT_PALETTE.measured], [`${CURVE_NAMES.theory} (actual circuit)`, PLOT_PALETTE.theory]]);
    expect(plot.bands.map((b) => [b.name, b.color])).toEqual([[CURVE_NAMES.measuredInterval, PLOT_PALETTE.measured]]);
    expect([plot.x.scale, plot.y.scale]).toEqual(['log', 'log']);
  });

  it('is named for its run and build', async () => {
    expect((await renderRecord(record(), 'pdf')).fileName).toBe('rolloff-noise-run-31-Board-A-hand-wired.pdf');
  });
});
