/**
 * One list of run states: the contract's RUN_STATUSES is what the released
 * schema's CHECK constraint allows (a released migration is never edited, so
 * the list follows it — a new state needs a new migration and this test fails
 * until both agree).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { RUN_STATUSES } from '../../../app/contract/contract';

describe('run states', () => {
  it('the contract and the schema\'s CHECK constraint list the same states', () => {
    const sql = readFileSync(resolve(__dirname, '../../../migrations/0001_initial.sql'), 'utf8');
    const check = /CHECK \(status IN \(([^)]*)\)\)/.exec(sql);
    expect(check).not.toBeNull();
    const inSchema = check![1].split(',').map((s) => s.trim().replace(/^'|'$/g, ''));
    expect(inSchema).toEqual([...RUN_STATUSES]);
  });
});
