/**
 * Serves the renderer bundle on the window's own scheme (renderer-scheme.ts)
 * through Electron's protocol module: registered as privileged before the app
 * is ready, handled after. The handler reads only files listed from the
 * bundle folder at start, and sends each with the Content-Security-Policy.
 */
import { readdir, readFile } from 'node:fs/promises';
import { join, resolve, sep } from 'node:path';
import { contentSecurityPolicy } from '../app/host/content-security-policy';
import { RENDERER_SCHEME, RENDERER_SCHEME_PRIVILEGES, resolveBundleRequest } from './renderer-scheme';

/** The parts of Electron's protocol module used here (injected so tests can pass a fake). */
export interface ProtocolLike {
  registerSchemesAsPrivileged(schemes: Array<{ scheme: string; privileges: typeof RENDERER_SCHEME_PRIVILEGES }>): void;
  handle(scheme: string, handler: (request: Request) => Response | Promise<Response>): void;
}

/** Must run before the app's ready event (Electron's rule for privileged schemes). */
export function registerRendererScheme(protocol: Pick<ProtocolLike, 'registerSchemesAsPrivileged'>): void {
  protocol.registerSchemesAsPrivileged([{ scheme: RENDERER_SCHEME, privileges: RENDERER_SCHEME_PRIVILEGES }]);
}

/** After ready: the window's files come from `bundleDir` and nowhere else. */
export async function serveRendererBundle(protocol: Pick<ProtocolLike, 'handle'>, bundleDir: string): Promise<void> {
  protocol.handle(RENDERER_SCHEME, await bundleRequestHandler(bundleDir));
}

export async function bundleRequestHandler(bundleDir: string): Promise<(request: Request) => Promise<Response>> {
  const root = resolve(bundleDir);
  const files = new Set(await listFiles(root));
  const policy = contentSecurityPolicy();
  return async (request) => {
    const outcome = resolveBundleRequest(request, files);
    if (!outcome.ok) return new Response(outcome.reason, { status: outcome.status, headers: { 'Content-Type': 'text/plain; charset=utf-8' } });
    const path = join(root, ...outcome.fileName.split('/'));
    // resolveBundleRequest only names listed files; this keeps that true should it ever change.
    if (!path.startsWith(root + sep)) return new Response('Outside the bundle folder.', { status: 403 });
    const body = await readFile(path);
    return new Response(request.method === 'HEAD' ? null : body, {
      status: 200,
      headers: {
        'Content-Type': outcome.contentType,
        'Content-Length': String(body.length),
        'Content-Security-Policy': policy,
        'X-Content-Type-Options': 'nosniff',
        'Cache-Control': 'no-store',
      },
    });
  };
}

/** Relative paths ("/"-separated) of the regular files under `root`. */
async function listFiles(root: string, prefix = ''): Promise<string[]> {
  const names: string[] = [];
  for (const entry of await readdir(join(root, prefix), { withFileTypes: true })) {
    const name = prefix ? `${prefix}/${entry.name}` : entry.name;
    if (entry.isDirectory()) names.push(...(await listFiles(root, name)));
    else if (entry.isFile()) names.push(name);
  }
  return names;
}
