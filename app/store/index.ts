export { SqliteStore } from './sqlite-store';
export { identityKey } from './identity-key';
export { openStore, checkDatabaseLocation, databaseUrlScheme, ACCEPTED_DATABASE_FORMS, type StoreOpener } from './open-store';
export * from './errors';
export * from './types';
export { defaultDatabasePath, resolveDatabasePath, resolveDatabaseChoice, userDataFolder, DATABASE_FILE_NAME, type DatabaseChoice, type PathEnvironment } from './paths';
export { loadMigrations, type Migration } from './migrations';
export { migrationsFolder, type MigrationsDialect } from './migrations-folder';
export type * from './store-interface';
