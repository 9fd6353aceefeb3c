/** DC transfer (log stage) records, from fixture data (log-stage equation plus seeded noise, see fixtures.ts). */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildRunRecord, readCsv, recordFromJson, renderRecord } from '../../../app/record';
import { runPlots } from '../../../app/record/record-plots';
import { validateAgainstSchema } from '../../../app/record/schema-validator';
import { dcRunDetail, LOG_STAGE_DESIGN } from './fixtures';

const SCHEMA = JSON.parse(readFileSync(new URL('../../../app/record/record.schema.json', import.meta.url), 'utf8'));

function dcRecord() {
  const { detail, build, dcFit } = dcRunDetail();
  return buildRunRecord(detail, { design: LOG_STAGE_DESIGN, build, dcFit, generatedAt: '2026-12-01T12:00:00.000Z' });
}

describe('DC (log stage) run record', () => {
  it('plots the transfer on a log input axis with the fitted curve over the points', () => {
    const [plot, ...others] = runPlots(dcRecord());
    expect(others).toHaveLength(0);
    expect(plot.title).toBe('DC transfer');
    expect(plot.x.scale).toBe('log');
    expect(plot.x.min).toBe(1e-3); // whole decades around 1 mV … 10 V
    expect(plot.x.max).toBe(10);
    expect(plot.series.map((s) => s.style)).toEqual(['line', 'points']);
  });

  it('CSV names the stimulus input_v_dc, reads back to the DC output voltages and carries no gain or phase columns', async () => {
    const record = dcRecord();
    const [header, ...rows] = readCsv(new TextDecoder().decode((await renderRecord(record, 'csv')).bytes));
    expect(header[3]).toBe('input_v_dc');
    expect(rows.map((r) => Number(r[header.indexOf('output_v_dc')]))).toEqual(record.points.outputVDc);
    expect(header.filter((name) => /gain|phase/.test(name))).toEqual([]);
  });

  it('JSON validates against the schema file and rebuilds the record, fit figures included', async () => {
    const record = dcRecord();
    const json = new TextDecoder().decode((await renderRecord(record, 'json')).bytes);
    expect(validateAgainstSchema(JSON.parse(json), SCHEMA)).toEqual([]);
    expect(recordFromJson(json)).toEqual(record);
    expect(record.figures.logFit?.n).toBeGreaterThan(0.9);
  });

  it('HTML shows the fitted parameters and the design value written in engineering notation', async () => {
    const html = new TextDecoder().decode((await renderRecord(dcRecord(), 'html')).bytes);
    expect(html).toContain('Diode ideality factor n');
    expect(html).toContain('10 kΩ'); // "10k" in the design file, parsed with app/units
    expect(html).toContain('IS 10 fA, n 1, RS 500 mΩ');
  });
});
