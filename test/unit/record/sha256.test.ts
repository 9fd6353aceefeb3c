import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { sha256Hex } from '../../../app/record/sha256';

describe('SHA-256 (FIPS 180-4)', () => {
  // Expected digests: NIST "Example Algorithm" vectors for SHA-256 (csrc.nist.gov,
  // SHA256.pdf: one-block "abc", two-block 448-bit message) and the long-message
  // vector of one million "a" (FIPS 180-2 Appendix B.3); "" is the well-known empty digest.
  it.each([
    ['abc', 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad'],
    ['abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq', '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1'],
    ['', 'e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855'],
  ])('digest of %j', (message, expected) => {
    expect(sha256Hex(message)).toBe(expected);
  });

  it('digest of one million "a" (FIPS 180-2 Appendix B.3)', () => {
    expect(sha256Hex('a'.repeat(1_000_000))).toBe('cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0');
  });

  it('agrees with node:crypto at every padding boundary (lengths 0…200 bytes, multi-byte UTF-8)', () => {
    // Independent implementation as the reference: OpenSSL through node:crypto.
    for (let length = 0; length <= 200; length++) {
      const text = 'µΩ-'.repeat(length).slice(0, length);
      expect(sha256Hex(text), `length ${length}`).toBe(createHash('sha256').update(text, 'utf8').digest('hex'));
    }
  });
});
