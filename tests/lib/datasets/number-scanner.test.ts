/**
 * Unit checks of the CSV field scanner. Reference values for accepted
 * spellings are Python's complex() on the same text (the spellings table in
 * fixtures/datasets/csv-expected.json, written by generate.py); refusals are
 * this project's documented policy (docs/conventions.md §6: NaN/Inf and non-numbers
 * are errors).
 */
import { describe, expect, it } from 'vitest';
import csvExpected from '@/fixtures/datasets/csv-expected.json';
import {
  SCAN_EMPTY,
  SCAN_NOT_A_NUMBER,
  SCAN_NOT_FINITE,
  SCAN_OK,
  looksNonFinite,
  scanComplexField,
} from '@/lib/datasets/number-scanner';

function scan(text: string) {
  const out = { re: NaN, im: NaN };
  const status = scanComplexField(text, 0, text.length, out);
  return { status, ...out };
}

describe('scanComplexField', () => {
  it('agrees with Python complex() on every spelling of the table (i read as j)', () => {
    for (const s of csvExpected.spellings) {
      const r = scan(s.text);
      // === treats +0 and −0 alike; Python gives −0.0 real parts for '-j'
      expect([s.text, r.status, r.re === s.re, r.im === s.im]).toEqual([s.text, SCAN_OK, true, true]);
    }
  });

  it('scans only the given slice of a longer line', () => {
    const line = 'xx,1.5-2e-1j,yy';
    const out = { re: 0, im: 0 };
    expect(scanComplexField(line, 3, 12, out)).toBe(SCAN_OK);
    expect(out).toEqual({ re: 1.5, im: -0.2 });
  });

  it('bare units mean a coefficient of one (documented choice, as Python)', () => {
    expect(scan('j')).toMatchObject({ status: SCAN_OK, re: 0, im: 1 });
    expect(scan('-I')).toMatchObject({ status: SCAN_OK, re: 0, im: -1 });
    expect(scan('2-j')).toMatchObject({ status: SCAN_OK, re: 2, im: -1 });
  });

  it.each([
    ['', SCAN_EMPTY],
    ['   ', SCAN_EMPTY],
    ['()', SCAN_NOT_A_NUMBER],
    ['abc', SCAN_NOT_A_NUMBER],
    ['1 2', SCAN_NOT_A_NUMBER],
    ['1+2', SCAN_NOT_A_NUMBER],
    ['1+2jj', SCAN_NOT_A_NUMBER],
    ['+', SCAN_NOT_A_NUMBER],
    ['.', SCAN_NOT_A_NUMBER],
    ['e5', SCAN_NOT_A_NUMBER],
    ['1e+', SCAN_NOT_A_NUMBER],
    ['1_000', SCAN_NOT_A_NUMBER],
    ['0x1f', SCAN_NOT_A_NUMBER],
    ['j1', SCAN_NOT_A_NUMBER],
    ['2j+1', SCAN_NOT_A_NUMBER],
    ['((1))', SCAN_NOT_A_NUMBER],
    ['1e999', SCAN_NOT_FINITE],
    ['1+1e999j', SCAN_NOT_FINITE],
    ['nan', SCAN_NOT_A_NUMBER],
  ])('%j → status %i', (text, status) => {
    expect(scan(text).status).toBe(status);
  });

  it('looksNonFinite spots NaN/Inf spellings but not names containing the letters', () => {
    for (const t of ['nan', 'NaN', '-inf', 'Infinity', '(nan+1j)', '1+infj', ' -nan '])
      expect([t, looksNonFinite(t)]).toEqual([t, true]);
    for (const t of ['inf_count', 'nancy', 'channel', '1+2j', 'info'])
      expect([t, looksNonFinite(t)]).toEqual([t, false]);
  });
});
