/**
 * CSV / text snapshot reader (docs/conventions.md §6).
 *
 * One snapshot per line, one element per comma-separated field. Fields are
 * read by number-scanner.ts (real, a+bi, a-bj, bi, (a+bj), bare unit = 1).
 * - Lines whose first non-blank character is '#' are comments.
 * - Blank lines (only spaces, tabs or a CR) are skipped.
 * - The first non-comment line is a header when none of its fields is a
 *   number and all are printable names; it must have as many fields as the data.
 * - A UTF-8 byte-order mark is dropped; line ends may be LF or CRLF.
 * Errors give 1-based rows that count physical file lines (comments and
 * blank lines included) and 1-based columns that count fields.
 *
 * Memory: the file is streamed in 1 MiB chunks; only the current partial line
 * and the growing output arrays are held. A line longer than maxLineLength
 * characters is refused.
 */
import { createReadStream } from 'node:fs';
import { StringDecoder } from 'node:string_decoder';
import { DatasetError, invalid, quoteText } from './errors';
import { GrowableFloat64 } from './growable';
import { CHUNK_BYTES, checkValueCount, progressReporter, throwIfAborted } from './io';
import {
  SCAN_EMPTY,
  SCAN_NOT_A_NUMBER,
  SCAN_NOT_FINITE,
  SCAN_OK,
  looksNonFinite,
  scanComplexField,
  type ScanResult,
} from './number-scanner';
import type { ParseOptions, ParsedSnapshots } from './types';
import { DEFAULT_MAX_LINE_LENGTH } from './types';

const HASH = 0x23;

function isPrintableName(text: string): boolean {
  // Printable and not a replacement character (undecodable bytes)
  return text.length > 0 && !/[\u0000-\u001f\u007f\ufffd]/.test(text);
}

export async function parseCsvFile(options: ParseOptions, totalBytes: number): Promise<ParsedSnapshots> {
  const maxLineLength = options.maxLineLength ?? DEFAULT_MAX_LINE_LENGTH;
  const report = progressReporter(options, totalBytes);
  const re = new GrowableFloat64(1 << 14);
  const im = new GrowableFloat64(1 << 14);
  const scan: ScanResult = { re: 0, im: 0 };

  let lineNo = 0; // 1-based number of the line being processed
  let elements = -1; // M once known
  let firstRowLine = 0; // line that fixed M
  let rows = 0;
  let header: string[] | null = null;
  let headerDecided = false;
  let commentLines = 0;

  const fieldError = (text: string, status: number, column: number): DatasetError => {
    const where = `row ${lineNo}, column ${column}`;
    const loc = { row: lineNo, column };
    if (status === SCAN_EMPTY) return invalid('empty-field', `${where}: the field is empty`, loc);
    if (/[\u0000\ufffd]/.test(text) || /[\u0001-\u0008\u000e-\u001f]/.test(text)) {
      return invalid(
        'binary-content',
        `${where}: the field holds binary data, not text (${quoteText(text.trim())})`,
        loc,
      );
    }
    if (status === SCAN_NOT_FINITE || looksNonFinite(text)) {
      return invalid(
        'not-finite',
        `${where}: ${quoteText(text.trim())} is not a finite number (NaN and Inf are not allowed)`,
        loc,
      );
    }
    return invalid('not-a-number', `${where}: ${quoteText(text.trim())} is not a number`, loc);
  };

  /** Splits a header candidate; returns names, or null if it is not a header. */
  const tryHeader = (line: string, start: number, end: number): string[] | null => {
    const names = line
      .slice(start, end)
      .split(',')
      .map((f) => f.trim());
    for (const name of names) {
      if (!isPrintableName(name)) return null;
      if (scanComplexField(name, 0, name.length, scan) !== SCAN_NOT_A_NUMBER) return null;
      if (looksNonFinite(name)) return null;
    }
    return names;
  };

  const processLine = (line: string, start: number, end: number): void => {
    if (end > start && line.charCodeAt(end - 1) === 0x0d) end--;
    // skip leading blanks to classify
    let p = start;
    while (p < end) {
      const c = line.charCodeAt(p);
      if (c !== 0x20 && c !== 0x09) break;
      p++;
    }
    if (p === end) return; // blank line
    if (line.charCodeAt(p) === HASH) {
      commentLines++;
      return;
    }
    if (!headerDecided) {
      headerDecided = true;
      const names = tryHeader(line, start, end);
      if (names) {
        header = names;
        elements = names.length;
        firstRowLine = lineNo;
        if (elements < 2) {
          throw invalid(
            'too-few-elements',
            `row ${lineNo}: the header names ${elements} column; an array needs at least 2`,
            { row: lineNo },
          );
        }
        return;
      }
    }
    // data row
    const base = rows * (elements > 0 ? elements : 0);
    const rowRe = elements > 0 ? re.reserve(base + elements) : null;
    const rowIm = elements > 0 ? im.reserve(base + elements) : null;
    let column = 0;
    let fieldStart = start;
    for (;;) {
      let comma = line.indexOf(',', fieldStart);
      if (comma === -1 || comma > end) comma = end;
      column++;
      if (elements > 0 && column > elements) {
        throw invalid(
          'ragged-row',
          `row ${lineNo}: has more than ${elements} fields (row ${firstRowLine} has ${elements})`,
          { row: lineNo, column },
        );
      }
      const status = scanComplexField(line, fieldStart, comma, scan);
      if (status !== SCAN_OK) throw fieldError(line.slice(fieldStart, comma), status, column);
      if (rowRe !== null && rowIm !== null) {
        rowRe[base + column - 1] = scan.re;
        rowIm[base + column - 1] = scan.im;
      } else {
        // first data row without header: M not known yet
        const r = re.reserve(column);
        const i = im.reserve(column);
        r[column - 1] = scan.re;
        i[column - 1] = scan.im;
      }
      if (comma === end) break;
      fieldStart = comma + 1;
    }
    if (elements < 0) {
      elements = column;
      firstRowLine = lineNo;
      if (elements < 2) {
        throw invalid('too-few-elements', `row ${lineNo}: has 1 column; an array needs at least 2 elements`, {
          row: lineNo,
          column: 1,
        });
      }
    } else if (column < elements) {
      throw invalid(
        'ragged-row',
        `row ${lineNo}: has ${column} field${column === 1 ? '' : 's'}; row ${firstRowLine} has ${elements}`,
        { row: lineNo, column: column + 1 },
      );
    }
    rows++;
    re.length = rows * elements;
    im.length = rows * elements;
    if ((rows & 0xffff) === 0) checkValueCount(rows, elements, options);
  };

  const stream = createReadStream(options.path, { highWaterMark: CHUNK_BYTES });
  const decoder = new StringDecoder('utf8');
  let carry = '';
  let bytesRead = 0;
  let first = true;
  try {
    for await (const chunk of stream as AsyncIterable<Buffer>) {
      throwIfAborted(options.signal);
      bytesRead += chunk.length;
      let text = carry + decoder.write(chunk);
      if (first && text.length > 0) {
        if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
        first = false;
      }
      let pos = 0;
      for (;;) {
        const nl = text.indexOf('\n', pos);
        if (nl === -1) break;
        lineNo++;
        if (nl - pos > maxLineLength) throw lineTooLong(lineNo, maxLineLength);
        processLine(text, pos, nl);
        pos = nl + 1;
      }
      carry = pos === 0 ? text : text.slice(pos);
      if (carry.length > maxLineLength) throw lineTooLong(lineNo + 1, maxLineLength);
      report(bytesRead);
    }
    carry += decoder.end();
    if (carry.length > 0) {
      lineNo++;
      if (carry.length > maxLineLength) throw lineTooLong(lineNo, maxLineLength);
      processLine(carry, 0, carry.length);
    }
  } finally {
    stream.destroy();
  }
  report(bytesRead, true);

  if (lineNo === 0 || (rows === 0 && header === null && commentLines === 0)) {
    throw invalid('empty-file', 'the file is empty: it has no snapshot rows');
  }
  if (rows === 0) {
    throw invalid(
      'no-snapshots',
      header
        ? `the file has a header row (row ${firstRowLine}) but no snapshot rows`
        : 'the file has only comments or blank lines, no snapshot rows',
    );
  }
  checkValueCount(rows, elements, options);
  return {
    format: 'csv',
    elements,
    snapshots: rows,
    re: re.toArray(),
    im: im.toArray(),
    details: { kind: 'csv', header, commentLines, lines: lineNo },
  };
}

function lineTooLong(row: number, max: number): DatasetError {
  return invalid('line-too-long', `row ${row}: the line is longer than ${max} characters`, { row });
}
