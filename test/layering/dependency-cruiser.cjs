/**
 * The layering rule of DEVELOPERS.md ("Where things live"), checked by dependency-cruiser
 * over the real import graph. test/unit/dependency-rules.test.ts runs it in
 * `npm test`, and shows it fails on a planted bad import.
 *
 * Direction: contract ← pure engines ← store ← read model ← service ← hosts
 * (app/cli, app/host, main, renderer). Pure folders import nothing of Node,
 * Electron or a host, no package but the few pure ones named here, and
 * nothing through require(). Every import must resolve. Globals (process,
 * Buffer, document) are no imports: tsconfig.pure.json beside this file
 * type-checks the same folders without Node's or the DOM's declarations, and
 * `npm run deps` runs both. Module paths are relative to the working
 * directory, the repository root.
 */

/**
 * Folders whose code must run anywhere: the window, the CLI, tests. One list,
 * tsconfig.pure.json's `include`, for both checks (as "app/units/" or a
 * single file).
 */
const { PURE_PATHS } = require('./pure-folders.cjs');
const PURE = PURE_PATHS.map((path) => `^${path.replace(/[.]/g, '[.]')}${path.endsWith('/') ? '' : '$'}`).join('|');
/** The only packages pure code may use, each in its own folder. */
const PURE_PACKAGES = [
  { folder: '^app/signal/', packages: 'fft[.]js' },
  { folder: '^app/contract/', packages: 'valibot' },
  { folder: '^app/circuit/', packages: 'valibot' },
];
const HOSTS = '^(app/cli|app/host|main|renderer)/';

module.exports = {
  forbidden: [
    {
      name: 'pure-imports-no-node',
      comment: 'Pure folders run in the window too: no Node built-ins.',
      severity: 'error',
      from: { path: PURE },
      to: { dependencyTypes: ['core'] },
    },
    {
      name: 'pure-imports-only-pure-code',
      comment: 'Pure folders import only other pure folders (no store, service, instruments or hosts).',
      severity: 'error',
      from: { path: PURE },
      to: { path: '^(app|main|renderer)/', pathNot: PURE },
    },
    ...PURE_PACKAGES.map(({ folder, packages }) => ({
      name: 'pure-imports-only-allowed-packages',
      comment: `Pure folders stay dependency-free, except ${packages} in ${folder}.`,
      severity: 'error',
      from: { path: folder },
      to: { dependencyTypes: ['npm', 'npm-dev', 'npm-optional', 'npm-peer', 'npm-no-pkg', 'npm-unknown'], pathNot: `node_modules/(${packages})/` },
    })),
    {
      name: 'pure-imports-only-allowed-packages',
      comment: 'Pure folders stay dependency-free.',
      severity: 'error',
      from: { path: PURE, pathNot: PURE_PACKAGES.map((p) => p.folder).join('|') },
      to: { dependencyTypes: ['npm', 'npm-dev', 'npm-optional', 'npm-peer', 'npm-no-pkg', 'npm-unknown'] },
    },
    {
      name: 'not-to-unresolvable',
      comment: 'Every import resolves to a file or an installed package: a typo or a missing package is an error, not a silent gap in the graph.',
      severity: 'error',
      from: {},
      // Except the built shell that main/entry.cjs starts: out/ exists only after `npm start` builds it.
      to: { couldNotResolve: true, pathNot: '^\\.\\./out/' },
    },
    {
      name: 'pure-imports-no-require',
      comment: 'Pure folders are ES modules that run in the window too: no require(), import = require() or process.getBuiltinModule().',
      severity: 'error',
      from: { path: PURE },
      to: { dependencyTypes: ['require', 'exotic-require', 'import-equals', 'process-get-builtin-module'] },
    },
    {
      name: 'pure-imports-no-electron',
      severity: 'error',
      from: { path: PURE },
      to: { path: '^electron$|node_modules/electron/' },
    },
    {
      name: 'contract-imports-nothing-above-it',
      comment: 'The contract is the bottom layer: it imports only itself and app/errors.ts.',
      severity: 'error',
      from: { path: '^app/contract/' },
      to: { path: '^(app|main|renderer)/', pathNot: '^app/contract/|^app/errors[.]ts$' },
    },
    {
      name: 'read-model-imports-below-the-service',
      comment: 'The read model shapes stored runs for views and records from the store, the contract and the pure engines; it never reaches into the service, the runner, instruments, the records or a host.',
      severity: 'error',
      from: { path: '^app/read-model/' },
      to: { path: '^(app|main|renderer)/', pathNot: `^app/(read-model|store)/|${PURE}` },
    },
    {
      name: 'read-model-imports-no-node',
      comment: 'The read model is computation over records: no Node built-ins (the store behind it has them).',
      severity: 'error',
      from: { path: '^app/read-model/' },
      to: { dependencyTypes: ['core'] },
    },
    {
      name: 'only-hosts-import-hosts',
      comment: 'The service and the engines never reach up into a host (CLI, web host, Electron main, window).',
      severity: 'error',
      from: { path: '^app/', pathNot: '^app/(cli|host)/' },
      to: { path: HOSTS },
    },
    {
      name: 'cli-holds-the-service-by-its-interface',
      comment: 'The CLI holds the service as LocalService (app/service/local-service.ts: the contract and the in-process calls), never the class, so no command reaches the store behind the service.',
      severity: 'error',
      from: { path: '^app/cli/' },
      to: { path: '^app/service/service[.]ts$' },
    },
    {
      name: 'renderer-imports-pure-contract-and-uplot',
      comment: 'The window imports only its own files, pure folders and the contract, and the packages uplot and valibot.',
      severity: 'error',
      from: { path: '^renderer/' },
      to: { pathNot: `^renderer/|${PURE}|node_modules/(uplot|valibot)/` },
    },
    {
      name: 'no-folder-cycles',
      comment: 'Folders depend one way: no import cycle between folders.',
      severity: 'error',
      scope: 'folder',
      from: {},
      to: { circular: true },
    },
  ],
  options: {
    doNotFollow: { path: 'node_modules' },
    // Our own build output only: an import of a package (node_modules) must stay visible to the package rules.
    exclude: { path: '^(out|dist)/' },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: { exportsFields: ['exports'], conditionNames: ['import', 'require', 'node', 'default', 'types'] },
    moduleSystems: ['es6', 'cjs'],
    // process.getBuiltinModule('fs') is an import of a built-in too.
    detectProcessBuiltinModuleCalls: true,
  },
};
