/**
 * The layering rule (DEVELOPERS.md "Layout"), checked by dependency-cruiser
 * with .dependency-cruiser.cjs over app/, main/ and renderer/: pure folders
 * import nothing of Node, Electron or a host; contract ← pure engines ←
 * store ← read model ← service ← hosts; the window imports only pure code, the contract and uplot;
 * no import cycle between folders. The second test plants one bad import of
 * each kind in a scratch tree and shows every rule fails on it.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';

const ROOT = resolve(__dirname, '../..');
const DEPCRUISE = join(ROOT, 'node_modules/dependency-cruiser/bin/dependency-cruise.mjs');

function depcruise(cwd: string, extra: string[] = []) {
  return spawnSync(process.execPath, [DEPCRUISE, 'app', 'main', 'renderer', '--config', join(ROOT, '.dependency-cruiser.cjs'), '--output-type', 'err', ...extra], {
    cwd,
    encoding: 'utf8',
  });
}

describe('dependency rules (dependency-cruiser)', () => {
  it('the source tree keeps them (known violations listed in .dependency-cruiser-known-violations.json)', () => {
    const result = depcruise(ROOT, ['--ignore-known', '.dependency-cruiser-known-violations.json']);
    expect(result.stdout + result.stderr).toMatch(/no dependency violations found/);
    expect(result.status).toBe(0);
  });

  it('fails on a planted bad import of every kind', () => {
    const folder = mkdtempSync(join(tmpdir(), 'rolloff-depcruise-'));
    try {
      const files: Record<string, string> = {
        'app/units/uses-node.ts': "import { readFileSync } from 'node:fs';\nexport const read = readFileSync;\n",
        'app/circuit/uses-store.ts': "import { open } from '../store/store';\nexport const o = open;\n",
        'app/store/store.ts': 'export const open = 1;\n',
        'app/contract/uses-service.ts': "import { run } from '../service/service';\nexport const r = run;\n",
        'app/service/service.ts': "import { host } from '../host/web-host';\nexport const run = host;\n",
        'app/host/web-host.ts': 'export const host = 1;\n',
        'renderer/view.ts': "import { open } from '../app/store/store';\nexport const v = open;\n",
        'app/analysis/a.ts': "import { b } from '../sim/b';\nexport const a = b;\n",
        'app/sim/b.ts': "import { c } from '../bench/c';\nexport const b = c;\n",
        'app/bench/c.ts': "import { d } from '../sim/d';\nexport const c = d;\n",
        'app/sim/d.ts': "import { e } from '../bench/e';\nexport const d = e;\n",
        'app/bench/e.ts': 'export const e = 1;\n',
        'app/read-model/uses-service.ts': "import { run } from '../service/service';\nimport { readFileSync } from 'node:fs';\nexport const r = [run, readFileSync];\n",
        'main/main.ts': "export {};\n",
      };
      for (const [path, text] of Object.entries(files)) {
        mkdirSync(dirname(join(folder, path)), { recursive: true });
        writeFileSync(join(folder, path), text);
      }
      copyFileSync(join(ROOT, 'tsconfig.json'), join(folder, 'tsconfig.json'));
      const result = depcruise(folder);
      const report = result.stdout + result.stderr;
      expect(result.status, report).not.toBe(0);
      expect(report).toMatch(/pure-imports-no-node: app\/units\/uses-node\.ts → (node:)?fs/);
      expect(report).toMatch(/pure-imports-only-pure-code: app\/circuit\/uses-store\.ts → app\/store\/store\.ts/);
      expect(report).toMatch(/contract-imports-nothing-above-it: app\/contract\/uses-service\.ts → app\/service\/service\.ts/);
      expect(report).toMatch(/only-hosts-import-hosts: app\/service\/service\.ts → app\/host\/web-host\.ts/);
      expect(report).toMatch(/renderer-imports-pure-contract-and-uplot: renderer\/view\.ts → app\/store\/store\.ts/);
      expect(report).toMatch(/read-model-imports-below-the-service: app\/read-model\/uses-service\.ts → app\/service\/service\.ts/);
      expect(report).toMatch(/read-model-imports-no-node: app\/read-model\/uses-service\.ts → (node:)?fs/);
      expect(report).toMatch(/no-folder-cycles: app\/(sim|bench)/);
    } finally {
      rmSync(folder, { recursive: true, force: true });
    }
  });
});
