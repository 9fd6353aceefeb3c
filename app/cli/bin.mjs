#!/usr/bin/env node
// Entry for `npx rolloff`: the sources are TypeScript, loaded through tsx so a
// fresh clone works right after `npm ci` with no build step.
import { register } from 'tsx/esm/api';

register();
const { main } = await import('./main.ts');
process.exitCode = await main(process.argv.slice(2));
