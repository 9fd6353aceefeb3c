import { describe, expect, it } from 'vitest';
import { readCsv, writeCsv } from '../../../app/record/csv';
import { ValidationError } from '../../../app/errors';

// Expected forms: RFC 4180 §2 (CRLF record ends, quoting of fields with comma,
// double quote or line break, doubled inner quotes).
describe('RFC 4180 CSV', () => {
  it('ends every record with CRLF and quotes only where needed', () => {
    const text = writeCsv(['a', 'b'], [['1', 'x,y'], ['say "hi"', 'two\r\nlines']]);
    expect(text).toBe('a,b\r\n1,"x,y"\r\n"say ""hi""","two\r\nlines"\r\n');
  });

  it('reads back exactly what it wrote, including awkward text', () => {
    const rows = [['<script>', '"&\'<>'], ['', 'line1\nline2'], ['µΩ, °', ' spaced ']];
    expect(readCsv(writeCsv(['h1', 'h2'], rows))).toEqual([['h1', 'h2'], ...rows]);
  });

  it('accepts a last record without CRLF (RFC 4180 §2.2)', () => {
    expect(readCsv('a,b\r\n1,2')).toEqual([['a', 'b'], ['1', '2']]);
  });

  it.each([
    ['a,b\r\n"1,2\r\n', /not closed/],
    ['a,b\r\n1,2"x\r\n', /quote inside an unquoted field/],
    ['a,b\n1,2\n', /not CRLF/],
    ['a,b\r\n1,2,3\r\n', /line 2.*3 fields where the header has 2/],
    ['a,b\r\n"1"x,2\r\n', /after a closing quote/],
  ])('refuses malformed input %j with a located error', (text, message) => {
    expect(() => readCsv(text, 'points.csv')).toThrow(ValidationError);
    expect(() => readCsv(text, 'points.csv')).toThrow(message);
  });
});
