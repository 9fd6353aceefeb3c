/**
 * The pure folders ("app/units/") and single pure files ("app/errors.ts"),
 * relative to the repository root, read from tsconfig.pure.json's `include`:
 * the one list that the type check, dependency-cruiser.cjs and the layering
 * tests share. The tsconfig's paths are relative to its own folder, so they
 * are resolved from here, not from the working directory.
 */
const { existsSync, readFileSync } = require('node:fs');
const { join, relative, resolve, sep } = require('node:path');

const REPOSITORY_ROOT = resolve(__dirname, '../..');
const PURE_TSCONFIG_PATH = join(__dirname, 'tsconfig.pure.json');
const FOLDER_PATTERN_SUFFIX = '/**/*.ts';

/** `../../app/units/**\/*.ts` → `app/units/`; `../../app/errors.ts` → `app/errors.ts`. */
function rootRelative(pattern) {
  const isFolder = pattern.endsWith(FOLDER_PATTERN_SUFFIX);
  const target = isFolder ? pattern.slice(0, -FOLDER_PATTERN_SUFFIX.length) : pattern;
  const path = relative(REPOSITORY_ROOT, resolve(__dirname, target)).split(sep).join('/');
  if (path === '' || path.startsWith('..') || target.includes('*') || (!isFolder && !path.endsWith('.ts'))) {
    throw new Error(
      `${relative(REPOSITORY_ROOT, PURE_TSCONFIG_PATH)}: include entry "${pattern}" is neither a folder ("../../app/<folder>${FOLDER_PATTERN_SUFFIX}") nor a single .ts file inside the repository; the layering checks read only those two forms. Write it in one of them.`,
    );
  }
  // A pattern that matches nothing is no error to tsc: the folder would go unguarded without a word.
  if (!existsSync(join(REPOSITORY_ROOT, path))) {
    throw new Error(
      `${relative(REPOSITORY_ROOT, PURE_TSCONFIG_PATH)}: include entry "${pattern}" names ${path}, which does not exist; paths there are relative to ${relative(REPOSITORY_ROOT, __dirname)}/. Fix the path, or drop the entry with the folder.`,
    );
  }
  return isFolder ? `${path}/` : path;
}

const PURE_PATHS = Object.freeze(JSON.parse(readFileSync(PURE_TSCONFIG_PATH, 'utf8')).include.map(rootRelative));

module.exports = { PURE_PATHS, PURE_TSCONFIG_PATH };
