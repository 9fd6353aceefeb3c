/**
 * Record export speed: a long run (2001 points, e.g. an overnight sweep at
 * 400 points per decade) built into a record and written in all four formats,
 * plus the SHA-256 digest throughput against OpenSSL (node:crypto).
 * Targets (common practice, no source — an export should feel immediate):
 * CSV/JSON/HTML ≤ 0.5 s, PDF ≤ 5 s for 2001 points; a typical 41-point run's PDF ≤ 1 s.
 * Run: npx tsx test/bench/record-export.ts
 */
import { createHash } from 'node:crypto';
import { buildRunRecord, renderRecord, sha256Hex } from '../../app/record';
import { acRunDetail, fixtureBuild, FIXTURE_DESIGN } from '../unit/record/fixtures';

function timed<T>(work: () => T): [T, number] {
  const started = performance.now();
  const result = work();
  return [result, performance.now() - started];
}

async function timedAsync<T>(work: () => Promise<T>): Promise<[T, number]> {
  const started = performance.now();
  const result = await work();
  return [result, performance.now() - started];
}

for (const pointsPerDecade of [8, 400]) {
  const detail = acRunDetail({ pointsPerDecade });
  const [record, buildMs] = timed(() => buildRunRecord(detail, { design: FIXTURE_DESIGN, build: fixtureBuild(), generatedAt: '2026-12-01T12:00:00.000Z' }));
  console.log(`record-export: ${record.points.step.length} points — build record with digest ${buildMs.toFixed(1)} ms`);
  await renderRecord(record, 'pdf'); // first call loads fonts; time the steady state
  for (const format of ['csv', 'json', 'html', 'pdf'] as const) {
    const [rendered, ms] = await timedAsync(() => renderRecord(record, format));
    console.log(`  ${format.padEnd(4)} ${ms.toFixed(1).padStart(8)} ms  ${(rendered.bytes.length / 1024).toFixed(0).padStart(6)} KiB`);
  }
}

const megabytes = 8;
const payload = new Uint8Array(megabytes * 1024 * 1024).map((_, i) => (i * 31) & 0xff);
const [ours, ourMs] = timed(() => sha256Hex(payload));
const [openssl, opensslMs] = timed(() => createHash('sha256').update(payload).digest('hex'));
console.log(`  SHA-256 over ${megabytes} MiB: own ${(megabytes / (ourMs / 1000)).toFixed(0)} MiB/s, node:crypto ${(megabytes / (opensslMs / 1000)).toFixed(0)} MiB/s, digests ${ours === openssl ? 'agree' : 'DIFFER'}`);
