/**
 * The layering rule (DEVELOPERS.md "Where things live"), checked by
 * dependency-cruiser with test/layering/dependency-cruiser.cjs over app/, main/ and
 * renderer/: every import resolves; pure folders import nothing of Node,
 * Electron or a host and nothing through require(); contract ← pure engines ←
 * store ← read model ← service ← hosts; the window imports only pure code, the
 * contract and uplot; no import cycle between folders. Globals are no imports,
 * so tsconfig.pure.json type-checks the pure folders without Node's and the
 * DOM's declarations: `process`, `require`, `Buffer` or `document` there is a
 * compile error. `npm run deps` runs both.
 *
 * Each check runs on the real tree (it passes) and on a scratch tree with one
 * planted breach of each rule (it fails, naming the file and the rule). Which
 * folders are pure is the table of DEVELOPERS.md; the checks' one list
 * (test/layering/tsconfig.pure.json, read through pure-folders.cjs) is held to
 * it, and every folder on it is shown guarded.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, relative, resolve } from 'node:path';
import { PURE_PATHS, PURE_TSCONFIG_PATH } from '../layering/pure-folders.cjs';

const ROOT = resolve(__dirname, '../..');
const DEPCRUISE = join(ROOT, 'node_modules/dependency-cruiser/bin/dependency-cruise.mjs');
const TSC = join(ROOT, 'node_modules/typescript/bin/tsc');
const CRUISER_CONFIG = join(ROOT, 'test/layering/dependency-cruiser.cjs');
/** Where the pure-folders tsconfig sits below the root (its paths are relative to that folder), in the real tree and in a scratch one. */
const PURE_TSCONFIG = relative(ROOT, PURE_TSCONFIG_PATH);

function depcruise(cwd: string, extra: string[] = []) {
  return spawnSync(process.execPath, [DEPCRUISE, 'app', 'main', 'renderer', '--config', CRUISER_CONFIG, '--output-type', 'err', ...extra], {
    cwd,
    encoding: 'utf8',
  });
}

function typeCheckPure(cwd: string) {
  return spawnSync(process.execPath, [TSC, '-p', join(cwd, PURE_TSCONFIG)], { cwd, encoding: 'utf8' });
}

/** A scratch tree holding `files`, the project's tsconfig files at their own places and (when asked) its node_modules; removed after `work`. */
function withScratchTree<T>(files: Record<string, string>, work: (folder: string) => T, options: { packages?: boolean } = {}): T {
  const folder = mkdtempSync(join(tmpdir(), 'rolloff-depcruise-'));
  try {
    for (const [path, text] of Object.entries(files)) {
      mkdirSync(dirname(join(folder, path)), { recursive: true });
      writeFileSync(join(folder, path), text);
    }
    copyFileSync(join(ROOT, 'tsconfig.json'), join(folder, 'tsconfig.json'));
    mkdirSync(dirname(join(folder, PURE_TSCONFIG)), { recursive: true });
    copyFileSync(PURE_TSCONFIG_PATH, join(folder, PURE_TSCONFIG));
    if (options.packages) symlinkSync(join(ROOT, 'node_modules'), join(folder, 'node_modules'));
    return work(folder);
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

/** The folders (or files) DEVELOPERS.md's table marks "pure only", e.g. `app/units/`. */
function pureInDevelopersGuide(): string[] {
  const guide = readFileSync(join(ROOT, 'DEVELOPERS.md'), 'utf8');
  return [...guide.matchAll(/^\| `([^`]+)` \|[^|]*\| pure only\b/gm)].map((m) => m[1]);
}

describe('dependency rules (dependency-cruiser)', () => {
  it('the source tree keeps them, with no baseline of tolerated violations', () => {
    const result = depcruise(ROOT);
    expect(result.stdout + result.stderr).toMatch(/no dependency violations found/);
    expect(result.status).toBe(0);
  });

  it('the pure folders are the ones DEVELOPERS.md names', () => {
    const documented = pureInDevelopersGuide();
    expect(documented).toContain('app/units/');
    expect(documented).toContain('app/errors.ts');
    expect([...PURE_PATHS].sort()).toEqual([...documented].sort());
  });

  it('the pure-folder list is read relative to its tsconfig, and an entry it cannot read is refused by name', () => {
    const readList = (include: string[]) =>
      withScratchTree({ 'app/units/db.ts': 'export const db = 1;\n', 'app/errors.ts': 'export {};\n' }, (folder) => {
        const reader = join(folder, 'test/layering/pure-folders.cjs');
        copyFileSync(join(ROOT, 'test/layering/pure-folders.cjs'), reader);
        writeFileSync(join(folder, PURE_TSCONFIG), JSON.stringify({ extends: '../../tsconfig.json', include }));
        // Run from elsewhere: the paths must not depend on the working directory.
        return spawnSync(process.execPath, ['-e', `console.log(JSON.stringify(require(${JSON.stringify(reader)}).PURE_PATHS))`], { cwd: tmpdir(), encoding: 'utf8' });
      });
    const good = readList(['../../app/units/**/*.ts', '../../app/errors.ts']);
    expect(good.status, good.stderr).toBe(0);
    expect(JSON.parse(good.stdout)).toEqual(['app/units/', 'app/errors.ts']);
    // Written as if relative to the root, or one level short: the folder it names does not exist.
    for (const misplaced of ['app/units/**/*.ts', '../app/units/**/*.ts']) {
      const result = readList([misplaced]);
      expect(result.status).not.toBe(0);
      expect(result.stderr).toContain(`include entry "${misplaced}" names `);
      expect(result.stderr).toContain('which does not exist; paths there are relative to test/layering/');
    }
    for (const unreadable of ['../../app/*.ts', '../../../elsewhere/**/*.ts', '../../app/errors.js']) {
      const result = readList([unreadable]);
      expect(result.status).not.toBe(0);
      expect(result.stderr).toContain(`include entry "${unreadable}" is neither a folder`);
    }
  });

  it('fails on a planted bad import of every kind', () => {
    const pureFolders = PURE_PATHS.filter((path) => path.endsWith('/'));
    const files: Record<string, string> = {
      // One Node import in every pure folder: each must be reported, so the rule guards the whole list.
      ...Object.fromEntries(pureFolders.map((folder) => [`${folder}uses-node.ts`, "import { readFileSync } from 'node:fs';\nexport const read = readFileSync;\n"])),
      'app/bench/uses-node.ts': "import { readFileSync } from 'node:fs';\nexport const read = readFileSync;\n", // not pure: allowed
      'app/circuit/uses-store.ts': "import { open } from '../store/store';\nexport const o = open;\n",
      'app/store/store.ts': 'export const open = 1;\n',
      'app/contract/uses-service.ts': "import { run } from '../service/service';\nexport const r = run;\n",
      'app/service/service.ts': "import { host } from '../host/web-host';\nexport const run = host;\n",
      'app/host/web-host.ts': 'export const host = 1;\n',
      'app/cli/uses-service-class.ts': "import { run } from '../service/service';\nexport const r = run;\n",
      'renderer/view.ts': "import { open } from '../app/store/store';\nexport const v = open;\n",
      'app/analysis/a.ts': "import { b } from '../sim/b';\nexport const a = b;\n",
      'app/sim/b.ts': "import { c } from '../bench/c';\nexport const b = c;\n",
      'app/bench/c.ts': "import { d } from '../sim/d';\nexport const c = d;\n",
      'app/sim/d.ts': "import { e } from '../bench/e';\nexport const d = e;\n",
      'app/bench/e.ts': 'export const e = 1;\n',
      'app/read-model/uses-service.ts': "import { run } from '../service/service';\nimport { readFileSync } from 'node:fs';\nexport const r = [run, readFileSync];\n",
      // Imports that resolve nowhere: a misspelt file and a package that is not installed.
      'app/bench/typo.ts': "import { e } from './ee';\nexport const t = e;\n",
      'main/missing-package.ts': "import pad from 'no-such-package-here';\nexport const p = pad;\n",
      // require() in a pure module, of a built-in and of a pure neighbour; and TypeScript's import = require().
      'app/signal/uses-require.ts': "const os = require('os');\nconst plain = require('./plain');\nexport const both = [os, plain];\n",
      'app/signal/plain.ts': 'export const plain = 1;\n',
      'app/units/import-equals.ts': "import plain = require('./plain-cjs');\nexport const p = plain;\n",
      'app/units/plain-cjs.ts': 'export = 1;\n',
      'app/numeric/builtin-module.ts': "export const os = process.getBuiltinModule('os');\n",
      'app/bench/uses-require.ts': "const os = require('os');\nexport const o = os;\n", // not pure: allowed
      'main/main.ts': 'export {};\n',
    };
    withScratchTree(files, (folder) => {
      const result = depcruise(folder);
      const report = result.stdout + result.stderr;
      expect(result.status, report).not.toBe(0);
      for (const pure of pureFolders) expect(report).toMatch(new RegExp(`pure-imports-no-node: ${pure}uses-node\\.ts → (node:)?fs`));
      expect(report).not.toMatch(/app\/bench\/uses-node\.ts/);
      expect(report).toMatch(/pure-imports-only-pure-code: app\/circuit\/uses-store\.ts → app\/store\/store\.ts/);
      expect(report).toMatch(/contract-imports-nothing-above-it: app\/contract\/uses-service\.ts → app\/service\/service\.ts/);
      expect(report).toMatch(/only-hosts-import-hosts: app\/service\/service\.ts → app\/host\/web-host\.ts/);
      expect(report).toMatch(/cli-holds-the-service-by-its-interface: app\/cli\/uses-service-class\.ts → app\/service\/service\.ts/);
      expect(report).toMatch(/renderer-imports-pure-contract-and-uplot: renderer\/view\.ts → app\/store\/store\.ts/);
      expect(report).toMatch(/read-model-imports-below-the-service: app\/read-model\/uses-service\.ts → app\/service\/service\.ts/);
      expect(report).toMatch(/read-model-imports-no-node: app\/read-model\/uses-service\.ts → (node:)?fs/);
      expect(report).toMatch(/read-model-imports-below-the-service: app\/read-model\/uses-service\.ts → app\/service\/service\.ts/);
      expect(report).toMatch(/read-model-imports-no-node: app\/read-model\/uses-service\.ts → (node:)?fs/);
      expect(report).toMatch(/no-folder-cycles: app\/(sim|bench)/);
      expect(report).toMatch(/not-to-unresolvable: app\/bench\/typo\.ts → \.\/ee/);
      expect(report).toMatch(/not-to-unresolvable: main\/missing-package\.ts → no-such-package-here/);
      expect(report).toMatch(/pure-imports-no-require: app\/signal\/uses-require\.ts → (node:)?os/);
      expect(report).toMatch(/pure-imports-no-require: app\/signal\/uses-require\.ts → app\/signal\/plain\.ts/);
      expect(report).toMatch(/pure-imports-no-require: app\/units\/import-equals\.ts → app\/units\/plain-cjs\.ts/);
      expect(report).toMatch(/pure-imports-no-require: app\/numeric\/builtin-module\.ts → (node:)?os/);
      expect(report).not.toMatch(/app\/bench\/uses-require\.ts/);
    });
  });
});

describe('pure folders use no Node or DOM globals (tsc -p test/layering/tsconfig.pure.json)', () => {
  it('fails on an installed package a pure folder may not use, and passes the packages it may', () => {
    withScratchTree(
      {
        // valibot is allowed in app/contract, not in app/units; fft.js only in app/signal.
        'app/units/uses-valibot.ts': "import * as v from 'valibot';\nexport const s = v.string();\n",
        'app/numeric/uses-fft.ts': "import FFT from 'fft.js';\nexport const f = FFT;\n",
        'app/contract/uses-valibot.ts': "import * as v from 'valibot';\nexport const s = v.string();\n",
        'main/main.ts': 'export {};\n',
        'renderer/view.ts': 'export {};\n',
      },
      (folder) => {
        const result = depcruise(folder);
        const report = result.stdout + result.stderr;
        expect(result.status, report).not.toBe(0);
        expect(report).toMatch(/pure-imports-only-allowed-packages: app\/units\/uses-valibot\.ts → \S*node_modules\/valibot\//);
        expect(report).toMatch(/pure-imports-only-allowed-packages: app\/numeric\/uses-fft\.ts → \S*node_modules\/fft\.js\//);
        expect(report).not.toMatch(/app\/contract\/uses-valibot\.ts/);
      },
      { packages: true },
    );
  });

  it('the source tree passes', () => {
    const result = typeCheckPure(ROOT);
    expect(result.stdout + result.stderr).toBe('');
    expect(result.status).toBe(0);
  });

  it('fails on process, require, Buffer and document in a pure module, and on nothing outside the pure folders', () => {
    const files: Record<string, string> = {
      'app/units/uses-process.ts': 'export const home = process.env.HOME;\n',
      'app/circuit/uses-require.ts': "export const later = (name: string) => require(name);\n",
      'app/signal/uses-buffer.ts': "export const bytes = Buffer.from('ab');\n",
      'app/analysis/uses-document.ts': 'export const title = () => document.title;\n',
      'app/errors.ts': 'export const where = __dirname;\n',
      // The allowed packages bring no Node declarations with them: globalThis.process stays unknown beside them.
      'app/contract/uses-valibot.ts': "import * as v from 'valibot';\nexport const schema = v.string();\nexport const env = globalThis.process;\n",
      'app/signal/uses-fft.ts': "import FFT from 'fft.js';\nexport const transform = new FFT(8);\n",
      'app/bench/uses-process.ts': 'export const home = process.env.HOME;\n', // not pure: allowed
    };
    withScratchTree(
      files,
      (folder) => {
        const result = typeCheckPure(folder);
        const report = result.stdout + result.stderr;
        expect(result.status, report).not.toBe(0);
        expect(report).toMatch(/app\/units\/uses-process\.ts\(1,\d+\): error TS\d+: Cannot find name 'process'/);
        expect(report).toMatch(/app\/circuit\/uses-require\.ts\(1,\d+\): error TS\d+: Cannot find name 'require'/);
        expect(report).toMatch(/app\/signal\/uses-buffer\.ts\(1,\d+\): error TS\d+: Cannot find name 'Buffer'/);
        expect(report).toMatch(/app\/analysis\/uses-document\.ts\(1,\d+\): error TS\d+: Cannot find name 'document'/);
        expect(report).toMatch(/app\/errors\.ts\(1,\d+\): error TS\d+: Cannot find name '__dirname'/);
        expect(report).toMatch(/app\/contract\/uses-valibot\.ts\(3,\d+\): error/);
        expect(report).not.toMatch(/uses-fft|app\/bench/);
      },
      { packages: true },
    );
  });
});
