/**
 * The Content-Security-Policy both shells apply. No remote origin appears in
 * it: the window loads and talks only to where it came from.
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
