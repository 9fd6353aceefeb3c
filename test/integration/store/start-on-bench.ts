/**
 * Child process for the concurrent-start test: opens the database, says
 * "ready", waits for "go" on stdin, then starts a run on bench "bench 1" as
 * its own claimant (createOwnedRun) and prints what happened as JSON.
 * Usage: node --import tsx start-on-bench.ts DB_PATH BUILD_ID
 */
import { hostname } from 'node:os';
import { once } from 'node:events';
import { SqliteStore } from '../../../app/store';
import { newRun } from '../../store-conformance/fixtures';

const [path, buildId] = process.argv.slice(2);
const store = SqliteStore.open(path);
const claimant = { ownerId: `start-on-bench:${process.pid}`, pid: process.pid, host: hostname(), label: 'concurrent start test' };
process.stdout.write('ready\n');
await once(process.stdin, 'data');
const result = await store.createOwnedRun(newRun(Number(buildId), { benchName: 'bench 1' }), claimant, 10_000);
process.stdout.write(JSON.stringify(result.created ? { created: true, runId: result.run.id, ownerId: claimant.ownerId } : { created: false, heldBy: result.benchHeldBy.runId }) + '\n');
await store.close();
process.stdin.destroy();
