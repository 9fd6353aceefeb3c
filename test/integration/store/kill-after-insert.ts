/**
 * Child process for the durability test: stores points one at a time, then
 * kills itself with SIGKILL right after the last insertPoint resolves — no
 * close(), no exit handlers, no chance to flush anything.
 * Usage: node --import tsx kill-after-insert.ts DB_PATH RUN_ID COUNT
 */
import { SqliteStore } from '../../../app/store';

const [path, runIdText, countText] = process.argv.slice(2);
const store = SqliteStore.open(path);
const runId = Number(runIdText);
const count = Number(countText);
for (let step = 0; step < count; step++) {
  await store.insertPoint(runId, {
    step,
    stimulus: 100 * (step + 1),
    amplitudeVpp: 1,
    gainDb: -0.01 * step,
    gainUncertaintyDb: 0.01,
    phaseDeg: -step,
    phaseUncertaintyDeg: 0.1,
    outputV: Number.NaN,
    flags: 0,
  });
  process.stdout.write(`stored ${step}\n`);
}
process.kill(process.pid, 'SIGKILL');
