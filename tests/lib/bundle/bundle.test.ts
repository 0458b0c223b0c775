import { createHash } from 'node:crypto';
import JSZip from 'jszip';
import { describe, expect, it } from 'vitest';
import { BundleError, readBundle, writeBundle } from '@/lib/bundle/bundle';
import { buildZip } from './zip-builder';

const author = { name: 'Ines Varga', email: 'engineer@steerwise.test' };
const createdAt = new Date('2026-05-04T09:30:00Z');

async function sample() {
  return writeBundle({
    title: 'Test line',
    author,
    softwareVersion: '0.1.0',
    createdAt,
    files: [
      {
        path: 'array/revision.json',
        kind: 'array-revision',
        data: JSON.stringify({ elements: 8, spacingWavelengths: 0.5 }),
      },
      { path: 'array/calibration.csv', kind: 'calibration', data: 'element,enabled,gainDb,phaseDeg\n1,true,0,0\n' },
      { path: 'summary.txt', kind: 'summary', data: 'Eight elements at half a wavelength.\n' },
    ],
  });
}

function codeOf(fn: () => unknown): string {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(BundleError);
    return (err as BundleError).code;
  }
  throw new Error('bundle was accepted');
}

async function rezip(files: Record<string, string | Uint8Array>): Promise<Uint8Array> {
  const zip = new JSZip();
  for (const [name, data] of Object.entries(files)) zip.file(name, data);
  return zip.generateAsync({ type: 'uint8array', compression: 'DEFLATE' });
}

describe('hand-off bundle format', () => {
  it('round-trips, and each digest equals an independent SHA-256 (node:crypto, FIPS 180-4)', async () => {
    const { zip, manifest } = await sample();
    const { manifest: read, files } = readBundle(zip);
    expect(read).toEqual(manifest);
    for (const f of read.files) {
      expect(createHash('sha256').update(files.get(f.path)!).digest('hex')).toBe(f.sha256);
    }
    expect(new TextDecoder().decode(files.get('summary.txt'))).toContain('Eight elements');
  });

  it('is byte-identical when written twice with the same inputs', async () => {
    const a = await sample();
    const b = await sample();
    expect(Buffer.from(a.zip).equals(Buffer.from(b.zip))).toBe(true);
  });

  it('refuses a tampered file', async () => {
    const { zip } = await sample();
    const files = readBundle(zip).files;
    const manifest = await (await JSZip.loadAsync(zip)).file('manifest.json')!.async('string');
    const tampered = await rezip({
      'manifest.json': manifest,
      'array/revision.json': JSON.stringify({ elements: 9, spacingWavelengths: 0.5 }),
      'array/calibration.csv': files.get('array/calibration.csv')!,
      'summary.txt': files.get('summary.txt')!,
    });
    expect(codeOf(() => readBundle(tampered))).toBe('checksum-mismatch');
  });

  it('refuses an unknown schema version before anything else', async () => {
    const { manifest } = await sample();
    const future = await rezip({ 'manifest.json': JSON.stringify({ ...manifest, schemaVersion: 2 }) });
    expect(codeOf(() => readBundle(future))).toBe('unknown-schema-version');
  });

  it('refuses a missing manifest, a missing file and an unlisted file', async () => {
    const { manifest, zip } = await sample();
    const files = readBundle(zip).files;
    expect(codeOf(() => readBundle(buildZip([{ name: 'summary.txt', data: files.get('summary.txt')! }])))).toBe(
      'missing-manifest',
    );
    const noSummary = await rezip({
      'manifest.json': JSON.stringify(manifest),
      'array/revision.json': files.get('array/revision.json')!,
      'array/calibration.csv': files.get('array/calibration.csv')!,
    });
    expect(codeOf(() => readBundle(noSummary))).toBe('missing-file');
    const extra = await rezip({
      'manifest.json': JSON.stringify(manifest),
      'array/revision.json': files.get('array/revision.json')!,
      'array/calibration.csv': files.get('array/calibration.csv')!,
      'summary.txt': files.get('summary.txt')!,
      'payload.sh': 'echo hi',
    });
    expect(codeOf(() => readBundle(extra))).toBe('unlisted-file');
  });

  it('wraps archive problems (not a zip) as code "archive"', () => {
    expect(codeOf(() => readBundle(new TextEncoder().encode('this is not a zip file at all, just text')))).toBe(
      'archive',
    );
  });

  it('refuses a manifest with a bad path or digest, naming the field', async () => {
    const { manifest } = await sample();
    const bad = { ...manifest, files: [{ ...manifest.files[0], path: '../x.json' }] };
    try {
      readBundle(await rezip({ 'manifest.json': JSON.stringify(bad) }));
      throw new Error('accepted');
    } catch (err) {
      expect((err as BundleError).code).toBe('bad-manifest');
      expect((err as Error).message).toContain('files.0.path');
    }
  });
});
