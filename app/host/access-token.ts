/**
 * Access control for the web host. On a loopback address only this machine
 * can reach it; anywhere else every request must carry a random token that
 * was printed at start, compared in constant time.
 */
import { randomBytes, timingSafeEqual } from 'node:crypto';

/** 32 random bytes: far beyond guessing over a network. */
export function createAccessToken(): string {
  return randomBytes(32).toString('base64url');
}

export function tokenMatches(expected: string, given: string | undefined): boolean {
  if (given === undefined) return false;
  const a = Buffer.from(expected);
  const b = Buffer.from(given);
  return a.length === b.length && timingSafeEqual(a, b);
}

/** 127.0.0.0/8, ::1 and "localhost" are reachable only from this machine. */
export function isLoopbackHost(host: string): boolean {
  const bare = host.replace(/^\[|\]$/g, '').toLowerCase();
  if (bare === 'localhost' || bare === '::1') return true;
  const ipv4 = /^127\.(\d{1,3})\.(\d{1,3})\.(\d{1,3})$/.exec(bare.replace(/^::ffff:/, ''));
  return ipv4 !== null && ipv4.slice(1).every((part) => Number(part) <= 255);
}

/** Where a request may carry the token: Authorization header, cookie, or ?token= on the first page load. */
export function tokenFromRequest(headers: Record<string, string | string[] | undefined>, url: URL): string | undefined {
  const authorization = headers.authorization;
  if (typeof authorization === 'string' && authorization.startsWith('Bearer ')) return authorization.slice('Bearer '.length).trim();
  const cookie = headers.cookie;
  if (typeof cookie === 'string') {
    for (const part of cookie.split(';')) {
      const [name, ...value] = part.trim().split('=');
      if (name === TOKEN_COOKIE) return value.join('=');
    }
  }
  return url.searchParams.get('token') ?? undefined;
}

export const TOKEN_COOKIE = 'rolloff_token';
