/**
 * Scanner for one CSV field holding a real or complex number (docs/conventions.md §6).
 *
 * Accepted spellings (spaces and tabs around the field, and just inside
 * parentheses, are ignored):
 *   real            1   -2.5   .5   5.   1e-3   -4.2E+7
 *   complex         a+bi   a-bj   (a+bj)   1e-3+2.5e+2j
 *   imaginary       bi   -2.5j   (bj)
 *   bare unit       j   -i   +j   1+j   1-i   — the unit alone means a
 *                   coefficient of 1, as Python's complex('j') == 1j does.
 * The imaginary unit is i or j, in either case. Exponents are e or E.
 * Not accepted: NaN, Inf, hexadecimal, digit separators, a space inside the
 * number ('1 + 2j'), the unit before the coefficient ('j2'), an empty field.
 *
 * The scanner only checks the syntax and finds the boundaries of each
 * number; the digits are converted by JavaScript's Number(), which rounds
 * correctly, so every float64 written with 17 significant digits reads back
 * exactly. A number that overflows to ±Infinity ('1e400') is refused as not finite.
 */

export const SCAN_OK = 0;
export const SCAN_EMPTY = 1;
export const SCAN_NOT_A_NUMBER = 2;
export const SCAN_NOT_FINITE = 3;
export type ScanStatus = typeof SCAN_OK | typeof SCAN_EMPTY | typeof SCAN_NOT_A_NUMBER | typeof SCAN_NOT_FINITE;

/** The value of the last successful scan (reused to avoid allocation in the hot loop). */
export interface ScanResult {
  re: number;
  im: number;
}

const SPACE = 0x20;
const TAB = 0x09;
const PLUS = 0x2b;
const MINUS = 0x2d;
const DOT = 0x2e;
const OPEN = 0x28;
const CLOSE = 0x29;

function isBlank(c: number): boolean {
  return c === SPACE || c === TAB;
}
function isDigit(c: number): boolean {
  return c >= 0x30 && c <= 0x39;
}
function isUnit(c: number): boolean {
  // i I j J
  return c === 0x69 || c === 0x49 || c === 0x6a || c === 0x4a;
}
function isExp(c: number): boolean {
  return c === 0x65 || c === 0x45;
}

/** Set by scanUnsigned: whether the mantissa had at least one digit. */
let lastHadDigits = false;

/**
 * Scans an unsigned decimal number (digits, optional point, optional
 * exponent) starting at i. Returns the index after it. `lastHadDigits`
 * tells whether any mantissa digit was seen; returns -1 on a malformed
 * exponent ('1e', '1e+').
 */
function scanUnsigned(s: string, i: number, end: number): number {
  let digits = 0;
  while (i < end && isDigit(s.charCodeAt(i))) {
    i++;
    digits++;
  }
  if (i < end && s.charCodeAt(i) === DOT) {
    i++;
    while (i < end && isDigit(s.charCodeAt(i))) {
      i++;
      digits++;
    }
  }
  lastHadDigits = digits > 0;
  if (digits > 0 && i < end && isExp(s.charCodeAt(i))) {
    let k = i + 1;
    if (k < end && (s.charCodeAt(k) === PLUS || s.charCodeAt(k) === MINUS)) k++;
    const expStart = k;
    while (k < end && isDigit(s.charCodeAt(k))) k++;
    if (k === expStart) return -1;
    i = k;
  }
  return i;
}

/**
 * Scans s[start, end) as one field. On SCAN_OK the value is in `out`.
 * Never throws.
 */
export function scanComplexField(s: string, start: number, end: number, out: ScanResult): ScanStatus {
  let a = start;
  let b = end;
  while (a < b && isBlank(s.charCodeAt(a))) a++;
  while (b > a && isBlank(s.charCodeAt(b - 1))) b--;
  if (a === b) return SCAN_EMPTY;
  if (s.charCodeAt(a) === OPEN) {
    if (s.charCodeAt(b - 1) !== CLOSE) return SCAN_NOT_A_NUMBER;
    a++;
    b--;
    while (a < b && isBlank(s.charCodeAt(a))) a++;
    while (b > a && isBlank(s.charCodeAt(b - 1))) b--;
    if (a === b) return SCAN_NOT_A_NUMBER;
  }

  // First term: [sign] unsigned
  let i = a;
  const c0 = s.charCodeAt(i);
  const firstNegative = c0 === MINUS;
  if (c0 === PLUS || c0 === MINUS) i++;
  const end1 = scanUnsigned(s, i, b);
  if (end1 < 0) return SCAN_NOT_A_NUMBER;
  const firstHasDigits = lastHadDigits;
  i = end1;

  if (i === b) {
    if (!firstHasDigits) return SCAN_NOT_A_NUMBER;
    const re = Number(s.slice(a, end1));
    if (re !== re || re === Infinity || re === -Infinity) return SCAN_NOT_FINITE;
    out.re = re;
    out.im = 0;
    return SCAN_OK;
  }

  const c1 = s.charCodeAt(i);
  if (isUnit(c1)) {
    // Purely imaginary: [sign][unsigned] unit
    if (i + 1 !== b) return SCAN_NOT_A_NUMBER;
    const im = firstHasDigits ? Number(s.slice(a, end1)) : firstNegative ? -1 : 1;
    if (im === Infinity || im === -Infinity || im !== im) return SCAN_NOT_FINITE;
    out.re = 0;
    out.im = im;
    return SCAN_OK;
  }
  if (!firstHasDigits || (c1 !== PLUS && c1 !== MINUS)) return SCAN_NOT_A_NUMBER;

  // Second term: sign [unsigned] unit
  const signAt = i;
  const end2 = scanUnsigned(s, i + 1, b);
  if (end2 < 0) return SCAN_NOT_A_NUMBER;
  const secondHasDigits = lastHadDigits;
  if (end2 + 1 !== b || !isUnit(s.charCodeAt(end2))) return SCAN_NOT_A_NUMBER;
  const re = Number(s.slice(a, end1));
  const im = secondHasDigits ? Number(s.slice(signAt, end2)) : c1 === MINUS ? -1 : 1;
  if (re === Infinity || re === -Infinity || im === Infinity || im === -Infinity || re !== re || im !== im) {
    return SCAN_NOT_FINITE;
  }
  out.re = re;
  out.im = im;
  return SCAN_OK;
}

const NUM = '(?:nan|inf(?:inity)?|\\d+\\.?\\d*(?:e[+-]?\\d+)?|\\.\\d+(?:e[+-]?\\d+)?)';
const NUMBER_LIKE = new RegExp(`^[+-]?(?:${NUM}(?:[+-]${NUM}?[ij])?|${NUM}?[ij])$`, 'i');

/**
 * Whether a refused field is a number spelled with NaN or an infinity
 * ('nan', '-Inf', 'infinity', '(nan+1j)', '1+infj'), for a clearer message.
 * Names that merely contain the letters ('inf_count') do not count.
 */
export function looksNonFinite(text: string): boolean {
  let t = text.replace(/\s+/g, '');
  if (t.startsWith('(') && t.endsWith(')')) t = t.slice(1, -1);
  return /nan|inf/i.test(t) && NUMBER_LIKE.test(t);
}
