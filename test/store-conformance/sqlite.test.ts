/** The store conformance suite against the SQLite store: a new file in a temp folder per store. */
import { afterAll } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { SqliteStore } from '../../app/store';
import { describeStoreConformance } from './store-conformance';

const folder = mkdtempSync(join(tmpdir(), 'rolloff-conformance-'));
afterAll(() => rmSync(folder, { recursive: true, force: true }));
let count = 0;

describeStoreConformance('SQLite file', async (options) => SqliteStore.open(join(folder, `store-${++count}.sqlite`), options));
describeStoreConformance('SQLite in memory', async (options) => SqliteStore.open(':memory:', options));
