#!/usr/bin/env node
// Runs every benchmark in this folder one after another (never in parallel: they
// time themselves and would disturb each other) and lets each print its figures.
import { readdirSync, readFileSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const only = process.argv.slice(2);
// A benchmark says how it is run ("Run: npx tsx test/bench/NAME.ts"); the shared modules, the stand-in
// instruments a benchmark starts and the comparison that needs another tree do not, and are left out.
const isBenchmark = (name) => readFileSync(join(here, name), 'utf8').includes(`Run: npx tsx test/bench/${name}`);
const scripts = readdirSync(here)
  .filter((name) => name.endsWith('.ts') && isBenchmark(name))
  .filter((name) => only.length === 0 || only.some((word) => name.includes(word)))
  .sort();

let failed = 0;
for (const script of scripts) {
  process.stdout.write(`\n=== ${script} ===\n`);
  const result = spawnSync(process.execPath, ['--import', 'tsx', join(here, script)], { stdio: 'inherit' });
  if (result.status !== 0) failed++;
}
process.stdout.write(`\n${scripts.length - failed} benchmarks ran, ${failed} failed\n`);
process.exitCode = failed === 0 ? 0 : 1;
