#!/usr/bin/env node
// Runs every benchmark in this folder one after another (never in parallel: they
// time themselves and would disturb each other) and lets each print its figures.
import { readdirSync } from 'node:fs';
import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const only = process.argv.slice(2);
const scripts = readdirSync(here)
  .filter((name) => name.endsWith('.ts'))
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
