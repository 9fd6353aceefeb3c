import { describe, expect, it } from 'vitest';
import { defaultDatabasePath, resolveDatabasePath } from '../../../app/store/paths';

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
});
