/**
 * The store conformance suite, unchanged, against the PostgreSQL store: a
 * throw-away cluster for this file (test/helpers/postgres-cluster.ts), a new
 * database per store. The password comes from a password file (PGPASSFILE),
 * as a bench would keep it, never from the address.
 */
import { afterAll, beforeAll, describe } from 'vitest';
import { PostgresStore } from '../../app/store/postgres/postgres-store';
import { postgresAvailable, startPostgresCluster, type PostgresCluster } from '../helpers/postgres-cluster';
import { describeStoreConformance } from './store-conformance';

const hasPostgres = postgresAvailable();

describe.skipIf(!hasPostgres)('PostgreSQL store', () => {
  let cluster: PostgresCluster;
  const savedPassFile = process.env.PGPASSFILE;
  let count = 0;

  beforeAll(async () => {
    cluster = await startPostgresCluster();
    process.env.PGPASSFILE = cluster.passwordFile;
  });
  afterAll(() => {
    if (savedPassFile === undefined) delete process.env.PGPASSFILE;
    else process.env.PGPASSFILE = savedPassFile;
    cluster?.remove();
  });

  describeStoreConformance('PostgreSQL', async (options) => PostgresStore.open(cluster.createDatabase(`conformance_${++count}`), options));
});
