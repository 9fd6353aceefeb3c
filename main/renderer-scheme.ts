/**
 * The window's own origin: the renderer bundle is served from
 * rolloff://app/ by a protocol handler, not from file://. The scheme is
 * registered as standard (so the page has a real origin and the CSP's 'self'
 * means exactly this bundle) and secure (treated like https: no mixed-content
 * downgrade). Electron's security checklist, item "avoid the file protocol and
 * prefer custom protocols" (electronjs.org/docs/latest/tutorial/security).
 *
 * This file holds what needs no Electron: the URL, the privileges, and the
 * decision which bundle file a request gets. renderer-protocol.ts connects
 * it to Electron's protocol module.
 */
import { contentTypeOf } from '../app/host/content-type';

export const RENDERER_SCHEME = 'rolloff';
export const RENDERER_HOST = 'app';
export const RENDERER_ORIGIN = `${RENDERER_SCHEME}://${RENDERER_HOST}`;
export const RENDERER_INDEX_URL = `${RENDERER_ORIGIN}/index.html`;

/** For protocol.registerSchemesAsPrivileged: an origin of its own, secure; nothing that loosens the page (no CSP bypass, no service workers). */
export const RENDERER_SCHEME_PRIVILEGES = { standard: true, secure: true } as const;

export type BundleRequestOutcome =
  | { ok: true; fileName: string; contentType: string }
  | { ok: false; status: 400 | 403 | 404 | 405; reason: string };

/** True for the page the window loads (with or without a fragment): the one sender the service answers. */
export function isRendererPageUrl(url: string): boolean {
  return url === RENDERER_INDEX_URL || url.startsWith(`${RENDERER_INDEX_URL}#`);
}

/**
 * Which bundle file a request gets. `bundleFiles` are the relative paths
 * (with "/") of the files in the bundle folder; only those are ever served.
 * A path segment that decodes to "..", ".", a separator or a NUL is refused
 * outright (403) rather than looked up, so no spelling of a path reaches
 * outside the folder.
 */
export function resolveBundleRequest(
  request: { url: string; method: string },
  bundleFiles: ReadonlySet<string>,
): BundleRequestOutcome {
  if (request.method !== 'GET' && request.method !== 'HEAD') {
    return { ok: false, status: 405, reason: `${request.method} is not allowed; the window's files are only read (GET).` };
  }
  let url: URL;
  try {
    url = new URL(request.url);
  } catch {
    return { ok: false, status: 400, reason: `${request.url.slice(0, 80)} is not a URL.` };
  }
  if (url.protocol !== `${RENDERER_SCHEME}:` || url.host !== RENDERER_HOST) {
    return { ok: false, status: 404, reason: `${url.origin === 'null' ? url.protocol : url.origin} is not the window's origin (${RENDERER_ORIGIN}).` };
  }
  // rolloff://app and rolloff://app/ are the page itself.
  const rawSegments = url.pathname === '' || url.pathname === '/' ? ['index.html'] : url.pathname.split('/').slice(1);
  const segments: string[] = [];
  for (const raw of rawSegments) {
    let segment: string;
    try {
      segment = decodeURIComponent(raw);
    } catch {
      return { ok: false, status: 400, reason: `The path ${url.pathname.slice(0, 80)} is not validly percent-encoded.` };
    }
    if (segment === '' || segment === '.' || segment === '..' || /[/\\\0:]/.test(segment)) {
      return { ok: false, status: 403, reason: `The path ${url.pathname.slice(0, 80)} leaves the window's folder or names no file.` };
    }
    segments.push(segment);
  }
  const fileName = segments.join('/');
  if (!bundleFiles.has(fileName)) return { ok: false, status: 404, reason: `${url.pathname.slice(0, 80)} is not a file of the window.` };
  return { ok: true, fileName, contentType: contentTypeOf(fileName) };
}
