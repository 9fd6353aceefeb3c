/**
 * --design means the same on every command: a number is a stored design's id,
 * anything else a design file (app/cli/design-option.ts). Through the real CLI
 * on a SQLite file and the simulated bench; a linear sweep has the --points it
 * was given. Common practice, no source.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { SqliteStore } from '../../../app/store';
import { makeDesignFromTemplate } from '../../../app/circuit/templates';
import type { RunRecord } from '../../../app/record/model';
import { RECORD_SCHEMA } from '../../../app/record/json-record';
import { validateAgainstSchema } from '../../../app/record/schema-validator';
import { tempFolder } from './helpers';

const BIN = join(resolve(__dirname, '../../..'), 'app/cli/bin.mjs');

describe('--design ID|FILE', () => {
  const folder = tempFolder();
  afterAll(() => folder.remove());
  const file = join(folder.path, 'stage.json');
  writeFileSync(file, JSON.stringify(makeDesignFromTemplate('inverting-lowpass', {})));
  const db = join(folder.path, 'designs.sqlite');
  const rolloff = (...args: string[]) => {
    const result = spawnSync(process.execPath, [BIN, ...args, '--db', db], { encoding: 'utf8', timeout: 120_000 });
    expect(result.status, `${args.join(' ')}\n${result.stderr}`).toBe(0);
    return result.stdout;
  };

  it('build add takes a stored id or a file; build list takes either and finds the same builds', () => {
    expect(rolloff('design', 'add', file)).toMatch(/^design 1 /);
    expect(rolloff('build', 'add', '--design', '1', '--label', 'by id')).toMatch(/of design 1 stored/);
    expect(rolloff('build', 'add', '--design', file, '--label', 'by file')).toMatch(/of design 2 stored/);
    expect(rolloff('build', 'list', '--design', '2')).not.toMatch(/by id/);
    const byFile = rolloff('build', 'list', '--design', file);
    expect(byFile).toMatch(/by id/);
    expect(byFile).toMatch(/by file/);
  });

  it('sweep --design ID sweeps a new build of the stored design, storing no second copy; --linear --points N', async () => {
    const out = rolloff('sweep', '--design', '1', '--label', 'swept', '--simulated', '--time-scale', '50', '--max-stimulus', '1',
      '--from', '100', '--to', '1k', '--linear', '--points', '5', '--no-refine', '--json');
    // sweep --json prints the run's JSON record: keys that name their quantity and unit, valid against the record schema.
    const record = JSON.parse(out) as RunRecord;
    expect(validateAgainstSchema(record, RECORD_SCHEMA)).toEqual([]);
    expect(record.run.plan.spacing).toBe('linear');
    expect(record.run.plan.points).toBe(5);
    expect(record.points.stimulus).toEqual([100, 325, 550, 775, 1000]);
    expect(Object.keys(record.points)).toEqual(expect.arrayContaining(['stimulusSettingVpp', 'outputVPeak']));
    expect(Object.keys(record.points)).not.toEqual(expect.arrayContaining(['outputV']));
    // show --json prints the same record of the same run (only the moment it was written differs).
    const shown = JSON.parse(rolloff('show', String(record.run.id), '--json')) as RunRecord;
    expect({ ...shown, generatedAt: '' }).toEqual({ ...record, generatedAt: '' });
    const store = SqliteStore.open(db, { readonly: true });
    try {
      expect((await store.listDesigns()).map((d) => d.id)).toEqual([1, 2]);
      expect((await store.listBuilds(1)).map((b) => b.label)).toContain('swept');
    } finally {
      await store.close();
    }
  });

  it('theory takes a stored id as it takes a file', () => {
    const fromStore = rolloff('theory', '1', '--summary');
    const fromFile = rolloff('theory', file, '--summary');
    expect(fromStore).toBe(fromFile);
    expect(fromStore).toMatch(/Pass-band gain/);
  });
});
