/**
 * Bench processes opening one fresh outbox file at the same moment (a lab bench's
 * CLI sweep and its window, started together): every one opens it, none finds
 * the tables without the format number (a half-made file it would refuse as
 * "an outbox of format 0"). Real processes, a real SQLite file.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { OutboxFile } from '../../../app/store/outbox/outbox-file';

const ROOT = resolve(__dirname, '../../..');
const OPENERS = 8;
const ROUNDS = 4;

function openInChild(path: string, startAtMs: number): Promise<{ code: number | null; stderr: string }> {
  const code = `
    import { OutboxFile } from ${JSON.stringify(join(ROOT, 'app/store/outbox/outbox-file.ts'))};
    while (Date.now() < ${startAtMs}) {} // all children open at once, after their slow start-up
    const outbox = OutboxFile.open(${JSON.stringify(path)});
    outbox.close();
  `;
  return new Promise((done) => {
    const child = spawn(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', code], { cwd: ROOT });
    let stderr = '';
    child.stderr.on('data', (chunk) => (stderr += chunk));
    child.on('close', (exitCode) => done({ code: exitCode, stderr }));
  });
}

describe('one outbox file opened by several processes at once', () => {
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-outbox-race-'));
  afterAll(() => rmSync(folder, { recursive: true, force: true }));

  it(`${OPENERS} processes × ${ROUNDS} fresh files: every open succeeds`, async () => {
    for (let round = 0; round < ROUNDS; round++) {
      const path = join(folder, `outbox-${round}.sqlite`);
      const startAtMs = Date.now() + 4000;
      const results = await Promise.all(Array.from({ length: OPENERS }, () => openInChild(path, startAtMs)));
      for (const result of results) expect(result.stderr).toBe('');
      expect(results.map((r) => r.code)).toEqual(Array(OPENERS).fill(0));
    }
  }, 120_000);

  it('an outbox locked for longer than the busy timeout (5 s) is opened once the lock is gone', async () => {
    const path = join(folder, 'outbox-held.sqlite');
    OutboxFile.open(path).close();
    // Another process holds the write lock for 6.5 s: past SQLite's busy timeout, within the open's 10 s of retries.
    const holder = spawn(process.execPath, ['--input-type=module', '-e', `
      import Database from ${JSON.stringify(join(ROOT, 'node_modules/better-sqlite3/lib/index.js'))};
      const db = new Database(${JSON.stringify(path)});
      db.exec('BEGIN EXCLUSIVE');
      console.log('held');
      setTimeout(() => { db.exec('COMMIT'); db.close(); }, 6500);
    `], { cwd: ROOT });
    await new Promise<void>((held, failed) => {
      holder.stdout.once('data', () => held());
      holder.once('exit', (code) => failed(new Error(`the lock holder exited (${code}) before it held the lock`)));
    });
    const startedMs = Date.now();
    const outbox = OutboxFile.open(path);
    const waitedMs = Date.now() - startedMs;
    outbox.close();
    expect(waitedMs).toBeGreaterThan(5000); // it did wait past one busy timeout, rather than finding the file free
    expect(waitedMs).toBeLessThan(10_000);
  }, 30_000);
});
