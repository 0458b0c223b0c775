/**
 * NPY snapshot reader (docs/conventions.md §6), written from the published NPY format
 * description (numpy.lib.format): magic '\x93NUMPY', major and minor version
 * bytes, a little-endian header length (uint16 for version 1, uint32 for 2 and
 * 3), then a Python dict literal with 'descr', 'fortran_order' and 'shape'.
 *
 * Taken: versions 1.0–3.0; dtypes complex64 ('c8'), complex128 ('c16'),
 * float32 ('f4') and float64 ('f8') in either byte order ('<', '>'; '|' and
 * '=' read as little-endian); C or Fortran order; shape (N, M), or (M,) for one
 * snapshot. The data section must hold exactly N·M items (a "lying" shape is
 * refused), and every value must be finite.
 *
 * Memory: the header is read on its own (at most 1 MiB) and the data section
 * is streamed in 1 MiB chunks straight into the output arrays.
 */
import { createReadStream } from 'node:fs';
import { invalid, quoteText, unsupported } from './errors';
import { CHUNK_BYTES, checkValueCount, progressReporter, readBytes, throwIfAborted, type ByteSource } from './io';
import type { ParseOptions, ParsedSnapshots } from './types';

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59]; // \x93NUMPY
const MAX_HEADER = 1024 * 1024;
const DTYPE_NAMES: Record<string, string> = { c8: 'complex64', c16: 'complex128', f4: 'float32', f8: 'float64' };

export interface NpyHeader {
  major: number;
  minor: number;
  descr: string;
  fortranOrder: boolean;
  shape: number[];
  /** Byte offset of the data section. */
  dataOffset: number;
}

// ---- a tiny reader for the Python literal in the header --------------------
type PyValue = string | number | boolean | null | PyValue[] | { [key: string]: PyValue };

class LiteralReader {
  private i = 0;
  constructor(private readonly s: string) {}

  private fail(what: string): never {
    throw invalid('bad-header', `NPY header is not a valid dictionary: ${what} at character ${this.i + 1}`);
  }
  private skip(): void {
    while (this.i < this.s.length && /\s/.test(this.s[this.i])) this.i++;
  }
  parseAll(): PyValue {
    const v = this.value(0);
    this.skip();
    if (this.i !== this.s.length) this.fail('unexpected text after the dictionary');
    return v;
  }
  private value(depth: number): PyValue {
    if (depth > 16) this.fail('nesting too deep');
    this.skip();
    const c = this.s[this.i];
    if (c === '{') return this.dict(depth);
    if (c === '(' || c === '[') return this.sequence(c === '(' ? ')' : ']', depth);
    if (c === "'" || c === '"') return this.string();
    const m = /^(True|False|None|-?\d+L?)/.exec(this.s.slice(this.i, this.i + 40));
    if (!m) this.fail(`unexpected ${quoteText(this.s.slice(this.i, this.i + 10))}`);
    this.i += m[1].length;
    if (m[1] === 'True') return true;
    if (m[1] === 'False') return false;
    if (m[1] === 'None') return null;
    return Number(m[1].replace('L', ''));
  }
  private string(): string {
    const q = this.s[this.i++];
    const end = this.s.indexOf(q, this.i);
    if (end < 0) this.fail('unterminated string');
    const v = this.s.slice(this.i, end);
    this.i = end + 1;
    return v;
  }
  private sequence(close: string, depth: number): PyValue[] {
    this.i++;
    const out: PyValue[] = [];
    for (;;) {
      this.skip();
      if (this.s[this.i] === close) {
        this.i++;
        return out;
      }
      out.push(this.value(depth + 1));
      this.skip();
      if (this.s[this.i] === ',') this.i++;
      else if (this.s[this.i] !== close) this.fail(`expected ',' or '${close}'`);
    }
  }
  private dict(depth: number): { [key: string]: PyValue } {
    this.i++;
    const out: { [key: string]: PyValue } = {};
    for (;;) {
      this.skip();
      if (this.s[this.i] === '}') {
        this.i++;
        return out;
      }
      const key = this.value(depth + 1);
      if (typeof key !== 'string') this.fail('a key that is not a string');
      this.skip();
      if (this.s[this.i] !== ':') this.fail("expected ':'");
      this.i++;
      out[key] = this.value(depth + 1);
      this.skip();
      if (this.s[this.i] === ',') this.i++;
      else if (this.s[this.i] !== '}') this.fail("expected ',' or '}'");
    }
  }
}

/** Reads and checks the NPY preamble and header. */
export async function readNpyHeader(source: ByteSource, fileSize: number): Promise<NpyHeader> {
  const pre = await readBytes(source, 0, 12);
  const bytesRead = pre.length;
  for (let k = 0; k < MAGIC.length; k++) {
    if (k >= bytesRead || pre[k] !== MAGIC[k]) {
      if (bytesRead === 0) throw invalid('empty-file', 'the NPY file is empty');
      if (k >= bytesRead) {
        throw invalid('truncated', `the NPY file is cut short: ${bytesRead} bytes, not even the 6-byte magic string`);
      }
      throw invalid('bad-magic', "not an NPY file: it does not start with the NPY magic string '\\x93NUMPY'");
    }
  }
  if (bytesRead < 10)
    throw invalid('truncated', `the NPY file is cut short: ${bytesRead} bytes, the preamble needs 10`);
  const major = pre[6];
  const minor = pre[7];
  if (major < 1 || major > 3) {
    throw unsupported(
      'unsupported-format',
      `NPY format version ${major}.${minor} is not supported: use versions 1.0 to 3.0`,
    );
  }
  let headerLength: number;
  let headerStart: number;
  if (major === 1) {
    headerLength = pre.readUInt16LE(8);
    headerStart = 10;
  } else {
    if (bytesRead < 12)
      throw invalid(
        'truncated',
        `the NPY file is cut short: ${bytesRead} bytes, the version ${major} preamble needs 12`,
      );
    headerLength = pre.readUInt32LE(8);
    headerStart = 12;
  }
  if (headerLength > MAX_HEADER) {
    throw invalid('bad-header', `NPY header length ${headerLength} bytes is implausible (the limit is ${MAX_HEADER})`);
  }
  if (headerStart + headerLength > fileSize) {
    throw invalid(
      'truncated',
      `the NPY header is cut short: it says ${headerLength} bytes, but the file ends ${fileSize - headerStart} bytes after the preamble`,
    );
  }
  const raw = await readBytes(source, headerStart, headerLength);
  const text = raw.toString(major === 3 ? 'utf8' : 'latin1');
  const parsed = new LiteralReader(text.trimEnd()).parseAll();
  if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed)) {
    throw invalid('bad-header', 'NPY header is not a dictionary');
  }
  const dict = parsed as { [key: string]: PyValue };
  for (const key of ['descr', 'fortran_order', 'shape']) {
    if (!(key in dict)) throw invalid('bad-header', `NPY header has no '${key}' entry`);
  }
  const descr = dict.descr;
  if (typeof descr !== 'string') {
    throw unsupported(
      'unsupported-dtype',
      'NPY dtype is a structured type, which is not supported: use complex64, complex128, float32 or float64',
    );
  }
  if (!/^[<>|=](c8|c16|f4|f8)$/.test(descr)) {
    throw unsupported(
      'unsupported-dtype',
      `NPY dtype ${quoteText(descr, 20)} is not supported: use complex64, complex128, float32 or float64`,
    );
  }
  if (typeof dict.fortran_order !== 'boolean')
    throw invalid('bad-header', "NPY header 'fortran_order' is not True or False");
  const shape = dict.shape;
  if (!Array.isArray(shape) || !shape.every((d) => typeof d === 'number' && Number.isSafeInteger(d) && d >= 0)) {
    throw invalid('bad-header', "NPY header 'shape' is not a tuple of non-negative integers");
  }
  return {
    major,
    minor,
    descr,
    fortranOrder: dict.fortran_order,
    shape: shape as number[],
    dataOffset: headerStart + headerLength,
  };
}

export async function parseNpyFile(options: ParseOptions, fileSize: number): Promise<ParsedSnapshots> {
  if (fileSize === 0) throw invalid('empty-file', 'the NPY file is empty');
  const h = await readNpyHeader(options.path, fileSize);
  const shapeText = `(${h.shape.join(', ')}${h.shape.length === 1 ? ',' : ''})`;
  if (h.shape.length === 0 || h.shape.length > 2) {
    throw invalid(
      'bad-shape',
      `NPY array has shape ${shapeText}; snapshots need shape (N, M), or (M,) for a single snapshot`,
    );
  }
  const snapshots = h.shape.length === 2 ? h.shape[0] : 1;
  const elements = h.shape.length === 2 ? h.shape[1] : h.shape[0];
  const code = h.descr.slice(1);
  const littleEndian = h.descr[0] !== '>';
  const isComplex = code[0] === 'c';
  const itemBytes = Number(code.slice(1));
  const partBytes = isComplex ? itemBytes / 2 : itemBytes;
  const expected = snapshots * elements * itemBytes;
  const actual = fileSize - h.dataOffset;
  if (expected !== actual) {
    throw invalid(
      'shape-mismatch',
      `NPY header says shape ${shapeText} of ${DTYPE_NAMES[code]}, which is ${expected} bytes of data, but the file holds ${actual} bytes after the header`,
    );
  }
  if (snapshots === 0 || elements === 0) {
    throw invalid('no-snapshots', `NPY array has shape ${shapeText}: it holds no values`);
  }
  if (elements < 2) {
    throw invalid(
      'too-few-elements',
      `NPY array has shape ${shapeText}: 1 element per snapshot; an array needs at least 2`,
    );
  }
  checkValueCount(snapshots, elements, options);

  const count = snapshots * elements;
  const re = new Float64Array(count);
  const im = new Float64Array(count);
  const report = progressReporter(options, fileSize);
  const fortran = h.fortranOrder && h.shape.length === 2;

  let item = 0; // items decoded, in file order
  let leftover = Buffer.alloc(0);
  let bytesRead = h.dataOffset;
  const stream = createReadStream(options.path, { start: h.dataOffset, highWaterMark: CHUNK_BYTES });
  try {
    for await (const piece of stream as AsyncIterable<Buffer>) {
      throwIfAborted(options.signal);
      bytesRead += piece.length;
      const buf = leftover.length ? Buffer.concat([leftover, piece]) : piece;
      const whole = Math.min(Math.floor(buf.length / itemBytes), count - item);
      const view = new DataView(buf.buffer, buf.byteOffset, buf.length);
      for (let q = 0; q < whole; q++, item++) {
        const o = q * itemBytes;
        let vr: number;
        let vi = 0;
        if (partBytes === 8) {
          vr = view.getFloat64(o, littleEndian);
          if (isComplex) vi = view.getFloat64(o + 8, littleEndian);
        } else {
          vr = view.getFloat32(o, littleEndian);
          if (isComplex) vi = view.getFloat32(o + 4, littleEndian);
        }
        let n: number;
        let m: number;
        if (fortran) {
          m = Math.floor(item / snapshots);
          n = item - m * snapshots;
        } else {
          n = Math.floor(item / elements);
          m = item - n * elements;
        }
        if (!Number.isFinite(vr) || !Number.isFinite(vi)) {
          throw invalid(
            'not-finite',
            `NPY value at snapshot row ${n + 1}, column ${m + 1} is ${Number.isNaN(vr) || Number.isNaN(vi) ? 'NaN' : 'infinite'}; all values must be finite`,
            { row: n + 1, column: m + 1 },
          );
        }
        const at = n * elements + m;
        re[at] = vr;
        im[at] = vi;
      }
      leftover = Buffer.from(buf.subarray(whole * itemBytes));
      report(bytesRead);
    }
  } finally {
    stream.destroy();
  }
  if (item !== count) {
    throw invalid('truncated', `the NPY data section ended after ${item} of ${count} values`);
  }
  report(bytesRead, true);
  return {
    format: 'npy',
    elements,
    snapshots,
    re,
    im,
    details: {
      kind: 'npy',
      version: `${h.major}.${h.minor}`,
      dtype: h.descr,
      fortranOrder: h.fortranOrder,
      shape: h.shape,
    },
  };
}
