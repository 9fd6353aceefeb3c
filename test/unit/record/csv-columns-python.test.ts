/**
 * The CSV of a scope run, a meter run and a DC run read by Python's csv module
 * (an RFC 4180 reader independent of the project's own): every column's name
 * states its unit, the output column says peak, RMS or DC, and the values read
 * back to the record's numbers.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { buildNoiseRunRecord, buildRunRecord, renderRecord } from '../../../app/record';
import { noiseRunFixture } from './noise-fixtures';
import type { RunRecord } from '../../../app/record';
import { requireTool, toolPath } from '../../helpers/required-tool';
import { acRunDetail, dcRunDetail, fixtureBuild, FIXTURE_DESIGN, LOG_STAGE_DESIGN } from './fixtures';

const GENERATED_AT = '2026-12-01T12:00:00.000Z';
const hasPython = requireTool('python3');

/** Python's csv.reader over the bytes: header and rows as Python sees them. */
function pythonCsv(csvText: string): { header: string[]; rows: string[][] } {
  const script = 'import csv, io, json, sys\nrows = list(csv.reader(io.StringIO(sys.stdin.read(), newline="")))\nprint(json.dumps({"header": rows[0], "rows": rows[1:]}))';
  const result = spawnSync(toolPath('python3')!, ['-c', script], { input: csvText, encoding: 'utf8' });
  if (result.status !== 0) throw new Error(`python3 csv failed: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

/** A column name ends in the unit it holds, or is one of the named unitless columns. */
const UNIT_SUFFIX = /_(hz|v_peak|v_rms|v_dc|vpp|db|deg)$/;
const UNITLESS = new Set(['run_id', 'build_label', 'step', 'flags', 'flag_names', 'measured_at']);

function scopeRecord(): RunRecord {
  return buildRunRecord(acRunDetail(), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: GENERATED_AT });
}
function meterRecord(): RunRecord {
  const detail = acRunDetail();
  detail.request = { ...detail.request, measurement: 'meter' };
  return buildRunRecord(detail, { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: GENERATED_AT });
}
function dcRecord(): RunRecord {
  const { detail, build, dcFit } = dcRunDetail();
  return buildRunRecord(detail, { design: LOG_STAGE_DESIGN, build, dcFit, generatedAt: GENERATED_AT });
}

const csvOf = async (record: RunRecord) => new TextDecoder().decode((await renderRecord(record, 'csv')).bytes);

describe.skipIf(!hasPython)('CSV columns read by Python csv (RFC 4180)', () => {
  const cases = [
    { name: 'scope run', make: scopeRecord, stimulus: 'frequency_hz', output: 'output_v_peak', jsonKey: 'outputVPeak', gain: true },
    { name: 'meter run', make: meterRecord, stimulus: 'frequency_hz', output: 'output_v_rms', jsonKey: 'outputVRms', gain: true },
    { name: 'DC run', make: dcRecord, stimulus: 'input_v_dc', output: 'output_v_dc', jsonKey: 'outputVDc', gain: false },
  ];
  for (const c of cases) {
    it(`${c.name}: every column names its unit; ${c.output} holds the output`, async () => {
      const record = c.make();
      const { header, rows } = pythonCsv(await csvOf(record));
      expect(header.filter((name) => !UNITLESS.has(name) && !UNIT_SUFFIX.test(name))).toEqual([]);
      expect(header[3]).toBe(c.stimulus);
      expect(header).toContain('stimulus_setting_vpp');
      expect(header.filter((name) => name.startsWith('output_v'))).toEqual([c.output]);
      expect(header.some((name) => /^(gain|phase)_/.test(name))).toBe(c.gain);
      expect(rows).toHaveLength(record.points.step.length);
      const column = (name: string) => rows.map((row) => row[header.indexOf(name)]).map((cell) => (cell === '' ? null : Number(cell)));
      expect(column(c.stimulus)).toEqual(record.points.stimulus);
      // The JSON record's points carry the same reading under the key of the same meaning, and no other output key.
      expect(Object.keys(record.points).filter((key) => key.startsWith('outputV'))).toEqual([c.jsonKey]);
      expect(column(c.output)).toEqual(record.points[c.jsonKey as 'outputVPeak']);
      expect(column('stimulus_setting_vpp')).toEqual(record.points.stimulusSettingVpp);
      if (c.gain) expect(column('gain_db')).toEqual(record.points.gainDb);
    });
  }

  it('noise run: the density columns name their unit (V/√Hz) and read back to the record\'s numbers', async () => {
    const record = buildNoiseRunRecord(noiseRunFixture(), { design: FIXTURE_DESIGN, build: fixtureBuild(), designId: 1, generatedAt: GENERATED_AT });
    const { header, rows } = pythonCsv(new TextDecoder().decode((await renderRecord(record, 'csv')).bytes));
    expect(header.slice(0, 2)).toEqual(['frequency_hz', 'noise_v_per_rthz']);
    expect(header.filter((name) => !/_(hz|v_per_rthz)$/.test(name))).toEqual([]);
    const column = (name: string) => rows.map((row) => Number(row[header.indexOf(name)]));
    expect(column('frequency_hz')).toEqual(record.density.frequencyHz);
    expect(column('noise_v_per_rthz')).toEqual(record.density.measuredVPerRtHz);
    expect(column('noise_uncertainty_v_per_rthz')).toEqual(record.density.uncertaintyVPerRtHz);
    expect(column('computed_noise_v_per_rthz')).toEqual(record.density.computedVPerRtHz);
  });
});
