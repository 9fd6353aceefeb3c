/**
 * Child process for the concurrent-open test: opens (creating and migrating)
 * the database and prints the migrations this process applied as JSON.
 * Usage: node --import tsx open-and-report.ts DB_PATH
 */
import { SqliteStore } from '../../../app/store';

const store = SqliteStore.open(process.argv[2]);
process.stdout.write(JSON.stringify(store.appliedMigrations) + '\n');
await store.close();
