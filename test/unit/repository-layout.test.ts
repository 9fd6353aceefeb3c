/**
 * The top level of the repository holds only the package files, the two
 * guides, the configuration files tools look for there and the folders of
 * DEVELOPERS.md ("Where things live"); configuration of one check lives with
 * that check (test/layering/ for the layering checks). Read from git's list of
 * tracked files, so build output, node_modules and local databases (ignored)
 * do not count, and a file counts as soon as it is added.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { requireTool } from '../helpers/required-tool';

const ROOT = resolve(__dirname, '../..');

/** Everything the top level may hold: files by name, folders by name (no slash). */
const ALLOWED_AT_TOP_LEVEL = [
  'package.json',
  'package-lock.json',
  'tsconfig.json',
  'electron-builder.yml',
  'README.md',
  'DEVELOPERS.md',
  '.gitignore',
  '.ci',
  'app',
  'main',
  'renderer',
  'migrations',
  'test',
];

function git(repository: string, args: string[]): string {
  const result = spawnSync('git', args, { cwd: repository, encoding: 'utf8' });
  if (result.status !== 0) throw new Error(`git ${args.join(' ')} failed in ${repository} (${result.error?.message ?? result.stderr.trim()}); the top-level check reads git's list of tracked files, so run it in a git checkout.`);
  return result.stdout;
}

/** The names at the top of the tracked (or added) files of `repository`, sorted: `app` for app/cli/bin.mjs. */
function trackedTopLevel(repository: string): string[] {
  const paths = git(repository, ['ls-files', '-z']).split('\0').filter(Boolean);
  return [...new Set(paths.map((path) => path.split('/')[0]))].sort();
}

function outsideTheAllowedList(names: string[]): string[] {
  return names.filter((name) => !ALLOWED_AT_TOP_LEVEL.includes(name));
}

describe.skipIf(!requireTool('git'))('repository top level', () => {
  it('holds only the allowed files and folders', () => {
    const names = trackedTopLevel(ROOT);
    // The listing is real: it sees the package file and the source folders.
    expect(names).toEqual(expect.arrayContaining(['package.json', 'app', 'test']));
    expect(outsideTheAllowedList(names), 'move these into the folder of their concern (see DEVELOPERS.md "Where things live")').toEqual([]);
  });

  it('reports a stray file or folder as soon as it is added, and nothing git ignores or does not track', () => {
    const repository = mkdtempSync(join(tmpdir(), 'rolloff-layout-'));
    try {
      const files = {
        'package.json': '{}\n',
        'app/errors.ts': 'export {};\n',
        'test/layering/tsconfig.pure.json': '{}\n',
        '.gitignore': 'node_modules/\n',
        // Strays: a tool's configuration and a notes folder at the top.
        '.dependency-cruiser.cjs': 'module.exports = {};\n',
        'tsconfig.pure.json': '{}\n',
        'notes/todo.md': 'x\n',
        // Not tracked: ignored, or never added.
        'node_modules/x/index.js': '\n',
        'scratch.txt': '\n',
      };
      for (const [path, text] of Object.entries(files)) {
        mkdirSync(dirname(join(repository, path)), { recursive: true });
        writeFileSync(join(repository, path), text);
      }
      git(repository, ['init', '-q']);
      git(repository, ['add', 'package.json', 'app', 'test', '.gitignore', '.dependency-cruiser.cjs', 'tsconfig.pure.json', 'notes']);
      expect(outsideTheAllowedList(trackedTopLevel(repository))).toEqual(['.dependency-cruiser.cjs', 'notes', 'tsconfig.pure.json']);
    } finally {
      rmSync(repository, { recursive: true, force: true });
    }
  });
});
