import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import JSZip from 'jszip';
import { describe, expect, it } from 'vitest';
import { DEFAULT_UNZIP_LIMITS, UnzipError, inspectZip, safeUnzip } from '@/lib/bundle/safe-unzip';
import { buildZip } from './zip-builder';

const fixtureDir = path.resolve(__dirname, '../../../fixtures/bundle');
const text = (s: string) => new TextEncoder().encode(s);

function refusal(buffer: Uint8Array, limits = DEFAULT_UNZIP_LIMITS): UnzipError {
  try {
    safeUnzip(buffer, limits);
  } catch (err) {
    expect(err).toBeInstanceOf(UnzipError);
    return err as UnzipError;
  }
  throw new Error('archive was accepted');
}

describe('safeUnzip on honest archives', () => {
  it('reads an archive written by Python zipfile (reference: fixtures/bundle/generate.py)', () => {
    const buffer = new Uint8Array(readFileSync(path.join(fixtureDir, 'python-zipfile.zip')));
    const expected = JSON.parse(readFileSync(path.join(fixtureDir, 'python-zipfile.json'), 'utf8')) as {
      archiveSha256: string;
      files: Record<string, { sha256: string; size: number }>;
    };
    // Consistency check of the fixture pair: the committed zip is the one the generator
    // described (it is byte-reproducible: fixed time stamps, zlib version recorded).
    expect(createHash('sha256').update(buffer).digest('hex')).toBe(expected.archiveSha256);
    const files = safeUnzip(buffer);
    expect([...files.keys()].sort()).toEqual(Object.keys(expected.files).sort());
    // Sizes and SHA-256 as Python's zipfile/hashlib computed them (outside reference).
    for (const [name, info] of Object.entries(expected.files)) {
      const data = files.get(name)!;
      expect(data.byteLength).toBe(info.size);
      expect(createHash('sha256').update(data).digest('hex')).toBe(info.sha256);
    }
  });

  it('reads what JSZip writes, stored and deflated', async () => {
    const zip = new JSZip();
    zip.file('manifest.json', JSON.stringify({ schema: 1 }));
    zip.file('pattern.csv', 'theta,db\n'.repeat(500));
    for (const compression of ['STORE', 'DEFLATE'] as const) {
      const buffer = await zip.generateAsync({ type: 'uint8array', compression });
      const files = safeUnzip(buffer);
      expect(new TextDecoder().decode(files.get('manifest.json'))).toBe('{"schema":1}');
      expect(files.get('pattern.csv')!.byteLength).toBe(9 * 500);
    }
  });
});

describe('safeUnzip refuses hostile archives', () => {
  it('a zip bomb (50 MB of zeros deflated to a few kB)', () => {
    const bomb = buildZip([{ name: 'zeros.bin', data: new Uint8Array(50 * 1024 * 1024), deflate: true }]);
    expect(bomb.byteLength).toBeLessThan(200_000);
    const err = refusal(bomb);
    expect(err.code).toBe('compression-ratio');
    expect(err.message).toMatch(/zeros\.bin.*compression ratio/);
  });

  it('an entry that inflates past the size it declares', () => {
    const liar = buildZip([{ name: 'small.txt', data: new Uint8Array(200_000), deflate: true, declaredSize: 1000 }]);
    const err = refusal(liar);
    expect(err.code).toBe('entry-too-large');
    expect(err.message).toContain("'small.txt'");
  });

  it('10 000 entries', () => {
    const many = buildZip(Array.from({ length: 10_000 }, (_, i) => ({ name: `f${i}.txt`, data: text('x') })));
    const err = refusal(many);
    expect(err.code).toBe('too-many-entries');
    expect(err.message).toContain('10000 entries');
  });

  it.each([
    ['../escape.txt', /climbs out/],
    ['data/../../escape.txt', /climbs out/],
    ['/etc/passwd', /absolute path/],
    ['C:/Windows/win.ini', /drive letter/],
    ['data\\evil.txt', /backslash/],
    ['a//b.txt', /empty or "\." path segment/],
    ['bad\u0001name', /control character/],
  ])('an unsafe name %j', (name, why) => {
    const err = refusal(buildZip([{ name, data: text('x') }]));
    expect(err.code).toBe('unsafe-path');
    expect(err.message).toMatch(why);
  });

  it('a symlink entry', () => {
    const err = refusal(buildZip([{ name: 'link', data: text('/etc/passwd'), unixMode: 0o120777 }]));
    expect(err.code).toBe('symlink');
  });

  it('accepts a plain Unix file mode (the symlink check is not a false alarm)', () => {
    const files = safeUnzip(buildZip([{ name: 'plain.txt', data: text('ok'), unixMode: 0o100644 }]));
    expect(new TextDecoder().decode(files.get('plain.txt'))).toBe('ok');
  });

  it('duplicate names', () => {
    const err = refusal(
      buildZip([
        { name: 'a.json', data: text('1') },
        { name: 'a.json', data: text('2') },
      ]),
    );
    expect(err.code).toBe('duplicate-name');
  });

  it('a truncated archive', async () => {
    const zip = new JSZip();
    zip.file('manifest.json', '{"schema":1}');
    const whole = await zip.generateAsync({ type: 'uint8array' });
    const err = refusal(whole.subarray(0, whole.byteLength - 30));
    expect(err.code).toBe('truncated');
  });

  it('a file that is not a zip, whatever its name', () => {
    expect(refusal(text('theta,power\n0,1\n'.repeat(20))).code).toBe('not-a-zip');
    expect(refusal(new Uint8Array(5)).code).toBe('not-a-zip');
  });

  it('a flipped data byte fails the CRC check', () => {
    const archive = buildZip([{ name: 'data.csv', data: text('1,2,3\n4,5,6\n') }]);
    const tampered = archive.slice();
    tampered[30 + 'data.csv'.length + 2] ^= 0xff;
    const err = refusal(tampered);
    expect(err.code).toBe('corrupt-entry');
    expect(err.message).toContain('CRC-32');
  });

  it('per-entry and total size limits', () => {
    const limits = { ...DEFAULT_UNZIP_LIMITS, maxEntryBytes: 1000, maxTotalBytes: 1500 };
    expect(refusal(buildZip([{ name: 'big.bin', data: new Uint8Array(2000) }]), limits).code).toBe('entry-too-large');
    const two = buildZip([
      { name: 'a.bin', data: new Uint8Array(900) },
      { name: 'b.bin', data: new Uint8Array(900) },
    ]);
    expect(refusal(two, limits).code).toBe('total-too-large');
  });

  it('inspectZip reports entries without inflating them', () => {
    const entries = inspectZip(
      buildZip([
        { name: 'dir/', data: new Uint8Array(0) },
        { name: 'dir/x.txt', data: text('abc') },
      ]),
    );
    expect(entries.map((e) => [e.name, e.isDirectory, e.uncompressedSize])).toEqual([
      ['dir/', true, 0],
      ['dir/x.txt', false, 3],
    ]);
  });
});
