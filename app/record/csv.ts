/**
 * RFC 4180 CSV: records end in CRLF (§2.1), fields holding a comma, a double
 * quote, CR or LF are quoted and inner quotes doubled (§2.6, §2.7). The reader
 * accepts exactly that grammar and reports where a file breaks it.
 */
import { ValidationError } from '../errors';

function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/** Header row plus rows, each record ending in CRLF (including the last, as §2.2 allows). */
export function writeCsv(header: string[], rows: string[][]): string {
  return [header, ...rows].map((row) => row.map(csvField).join(',') + '\r\n').join('');
}

/** Parses RFC 4180 text into rows of fields. Checks that every row has as many fields as the first. */
export function readCsv(text: string, where = 'CSV'): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let i = 0;
  let line = 1;
  let atFieldStart = true;
  while (i < text.length) {
    const c = text[i];
    if (atFieldStart && c === '"') {
      // Quoted field: runs to the next lone quote; "" is a literal quote.
      i++;
      for (;;) {
        if (i >= text.length) throw new ValidationError(`${where} line ${line}`, 'a quoted field is not closed', 'Check the file was not cut short.');
        if (text[i] === '"') {
          if (text[i + 1] === '"') {
            field += '"';
            i += 2;
            continue;
          }
          i++;
          break;
        }
        if (text[i] === '\n') line++;
        field += text[i++];
      }
      atFieldStart = false;
      if (i < text.length && text[i] !== ',' && text[i] !== '\r') {
        throw new ValidationError(`${where} line ${line}`, `unexpected "${text[i]}" after a closing quote`);
      }
      continue;
    }
    if (c === ',') {
      row.push(field);
      field = '';
      atFieldStart = true;
      i++;
    } else if (c === '\r' && text[i + 1] === '\n') {
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
      atFieldStart = true;
      i += 2;
      line++;
    } else if (c === '"' || c === '\r' || c === '\n') {
      throw new ValidationError(`${where} line ${line}`, c === '"' ? 'a quote inside an unquoted field' : 'a line break that is not CRLF outside quotes', 'RFC 4180 requires CRLF line ends and quoted fields for quotes and line breaks.');
    } else {
      field += c;
      atFieldStart = false;
      i++;
    }
  }
  if (!atFieldStart || row.length > 0) {
    row.push(field);
    rows.push(row);
  }
  const width = rows[0]?.length ?? 0;
  rows.forEach((r, index) => {
    if (r.length !== width) throw new ValidationError(`${where} line ${index + 1}`, `has ${r.length} fields where the header has ${width}`);
  });
  return rows;
}
