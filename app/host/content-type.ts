/**
 * Content-Type of a renderer bundle file, by its extension. The web host and
 * the Electron shell serve the same files, so both take the type from here.
 * Types per the IANA media types registry (text/javascript: RFC 9239).
 */
const CONTENT_TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.woff2': 'font/woff2',
};

/** Anything else is served as bytes (with nosniff, the page cannot run or style with it). */
export const UNKNOWN_CONTENT_TYPE = 'application/octet-stream';

export function contentTypeOf(fileName: string): string {
  const dot = fileName.lastIndexOf('.');
  const slash = fileName.lastIndexOf('/');
  return dot > slash ? (CONTENT_TYPES[fileName.slice(dot).toLowerCase()] ?? UNKNOWN_CONTENT_TYPE) : UNKNOWN_CONTENT_TYPE;
}
