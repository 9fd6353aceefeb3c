/**
 * The Content-Security-Policy both shells apply. No remote origin appears in
 * it: the window loads and talks only to where it came from. 'self' is the
 * web host's http://127.0.0.1:PORT in a browser, and rolloff://app in the
 * Electron shell (main/renderer-scheme.ts) — never file://, where 'self'
 * does not single out the app's own files.
 */
export function contentSecurityPolicy(connectSources: string[] = []): string {
  return [
    "default-src 'self'",
    "script-src 'self'",
    "style-src 'self'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    `connect-src 'self'${connectSources.length ? ' ' + connectSources.join(' ') : ''}`,
    "object-src 'none'",
    "base-uri 'none'",
    "form-action 'none'",
    "frame-ancestors 'none'",
  ].join('; ');
}
