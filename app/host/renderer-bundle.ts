/**
 * Bundles the renderer (views, client, uPlot, the pure modules they use) with
 * esbuild, in memory. The web host serves these files; the Electron build
 * writes the same files to disk, so both shells run one renderer.
 */
import { build } from 'esbuild';
import { readFile } from 'node:fs/promises';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { contentTypeOf } from './content-type';

export interface StaticFile {
  contentType: string;
  body: Buffer;
}

/** Relative URL path (e.g. "index.html", "app.js") → file. */
export type RendererFiles = Map<string, StaticFile>;

const PROJECT_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const RENDERER_DIR = join(PROJECT_ROOT, 'renderer');

export async function bundleRenderer(options: { minify?: boolean } = {}): Promise<RendererFiles> {
  const result = await build({
    entryPoints: { app: join(RENDERER_DIR, 'main.ts') },
    bundle: true,
    write: false,
    outdir: '/renderer-out',
    format: 'esm',
    platform: 'browser',
    target: ['chrome120'],
    minify: options.minify ?? true,
    sourcemap: false,
    legalComments: 'none',
    logLevel: 'silent',
  });
  const files: RendererFiles = new Map();
  for (const output of result.outputFiles) {
    const name = output.path.slice('/renderer-out/'.length);
    files.set(name, { contentType: contentTypeOf(name), body: Buffer.from(output.contents) });
  }
  const html = await readFile(join(RENDERER_DIR, 'index.html'), 'utf8');
  files.set('index.html', { contentType: contentTypeOf('index.html'), body: Buffer.from(html) });
  return files;
}
