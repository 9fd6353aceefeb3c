import { describe, expect, it } from 'vitest';
import { defaultDatabasePath, resolveDatabaseChoice, resolveDatabasePath } from '../../../app/store/paths';

// Expected folders: XDG Base Directory Specification (XDG_DATA_HOME, default ~/.local/share) on Linux;
// ~/Library/Application Support on macOS and %APPDATA% on Windows (each platform's documented convention, recalled from memory).
describe('database path', () => {
  it('follows XDG_DATA_HOME on Linux, falling back to ~/.local/share', () => {
    expect(defaultDatabasePath({ env: { XDG_DATA_HOME: '/data/me' }, platform: 'linux', homeDir: '/home/me' })).toBe('/data/me/rolloff/rolloff.sqlite');
    expect(defaultDatabasePath({ env: {}, platform: 'linux', homeDir: '/home/me' })).toBe('/home/me/.local/share/rolloff/rolloff.sqlite');
    // A relative XDG_DATA_HOME is invalid per the specification and ignored.
    expect(defaultDatabasePath({ env: { XDG_DATA_HOME: 'rel' }, platform: 'linux', homeDir: '/home/me' })).toBe('/home/me/.local/share/rolloff/rolloff.sqlite');
  });

  it('uses Application Support on macOS and APPDATA on Windows', () => {
    expect(defaultDatabasePath({ env: {}, platform: 'darwin', homeDir: '/Users/me' })).toBe('/Users/me/Library/Application Support/Rolloff/rolloff.sqlite');
    expect(defaultDatabasePath({ env: { APPDATA: 'C:\\Users\\me\\AppData\\Roaming' }, platform: 'win32', homeDir: 'C:\\Users\\me' })).toBe(
      'C:\\Users\\me\\AppData\\Roaming\\Rolloff\\rolloff.sqlite',
    );
  });

  it('lets ROLLOFF_DB override the default and --db override both', () => {
    const environment = { env: { ROLLOFF_DB: '/tmp/bench.sqlite', XDG_DATA_HOME: '/data/me' }, platform: 'linux' as const, homeDir: '/home/me' };
    expect(defaultDatabasePath(environment)).toBe('/tmp/bench.sqlite');
    expect(resolveDatabasePath('/work/other.sqlite', environment)).toBe('/work/other.sqlite');
    expect(resolveDatabasePath(undefined, environment)).toBe('/tmp/bench.sqlite');
  });

  it('takes --db, then ROLLOFF_DB, then the window\'s saved setting, then the default file (our own order, README "Lab store")', () => {
    const linux = (env: Record<string, string>) => ({ env: { XDG_DATA_HOME: '/data/me', ...env }, platform: 'linux' as const, homeDir: '/home/me' });
    const saved = 'postgres://rolloff@lab:5432/runs';
    expect(resolveDatabaseChoice('/work/a.sqlite', saved, linux({ ROLLOFF_DB: '/tmp/b.sqlite' }))).toEqual({ location: '/work/a.sqlite', source: 'command line' });
    expect(resolveDatabaseChoice(undefined, saved, linux({ ROLLOFF_DB: '/tmp/b.sqlite' }))).toEqual({ location: '/tmp/b.sqlite', source: 'environment' });
    expect(resolveDatabaseChoice(undefined, saved, linux({}))).toEqual({ location: saved, source: 'saved setting' });
    expect(resolveDatabaseChoice(undefined, undefined, linux({}))).toEqual({ location: '/data/me/rolloff/rolloff.sqlite', source: 'default' });
    // The CLI has no saved setting: its path is the same choice without one.
    expect(resolveDatabasePath(undefined, linux({}))).toBe('/data/me/rolloff/rolloff.sqlite');
  });
});
