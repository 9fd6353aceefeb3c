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
});
