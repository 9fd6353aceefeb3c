export { SqliteStore } from './sqlite-store';
export { identityKey } from './identity-key';
export { openStore, databaseUrlScheme, type StoreOpener } from './open-store';
export * from './errors';
export * from './types';
export { defaultDatabasePath, resolveDatabasePath, userDataFolder, DATABASE_FILE_NAME } from './paths';
export { loadMigrations, type Migration } from './migrations';
export { migrationsFolder, type MigrationsDialect } from './migrations-folder';
export type * from './store-interface';
