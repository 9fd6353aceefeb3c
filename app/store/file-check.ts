/**
 * Cheap checks on an existing database file before SQLite touches it, so a file
 * that is not ours (random bytes) or is cut short is refused and never written.
 * Layout from the SQLite file format documentation, section "The Database Header"
 * (offsets 16, 24, 28, 92; recalled from memory, checked against real files in the tests).
 */
import { closeSync, openSync, readSync, statSync } from 'node:fs';

const HEADER_BYTES = 100;
const MAGIC = 'SQLite format 3\u0000';

/** Returns why the file is unusable, or undefined when the header looks sound. */
export function describeFileDamage(path: string): string | undefined {
  const size = statSync(path).size;
  if (size === 0) return undefined; // SQLite treats an empty file as an empty database
  if (size < HEADER_BYTES) return `only ${size} bytes, shorter than a database header`;
  const header = Buffer.alloc(HEADER_BYTES);
  const fd = openSync(path, 'r');
  try {
    readSync(fd, header, 0, HEADER_BYTES, 0);
  } finally {
    closeSync(fd);
  }
  if (header.toString('latin1', 0, 16) !== MAGIC) return 'no SQLite header';
  const rawPageSize = header.readUInt16BE(16);
  const pageSize = rawPageSize === 1 ? 65536 : rawPageSize; // the header stores 65536 as 1
  if (pageSize < 512 || (pageSize & (pageSize - 1)) !== 0) return `invalid page size ${rawPageSize}`;
  const changeCounter = header.readUInt32BE(24);
  const pageCount = header.readUInt32BE(28);
  const versionValidFor = header.readUInt32BE(92);
  // the in-header page count is valid only when it was written together with the change counter.
  if (pageCount > 0 && changeCounter === versionValidFor) {
    const expectedBytes = pageCount * pageSize;
    if (size < expectedBytes) return `truncated: ${size} bytes, header says ${expectedBytes}`;
  }
  if (size % pageSize !== 0) return `size ${size} is not a whole number of ${pageSize}-byte pages`;
  return undefined;
}
