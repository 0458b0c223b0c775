/**
 * The Steerwise hand-off bundle: a zip with a manifest that lists every other
 * file with its SHA-256 (FIPS 180-4) and size.
 *
 * Writing uses JSZip. Reading never trusts the archive: `safeUnzip` vets the
 * central directory and inflates under caps, then the manifest is validated
 * with zod, the schema version is checked before anything else, and every
 * listed file must be present with a matching digest and size. Entries that
 * the manifest does not list are refused, so nothing rides along unchecked.
 *
 * Layout (schema version 1):
 *   manifest.json                    this file's contract, see `manifestSchema`
 *   array/revision.json              the array revision (kind "array-revision")
 *   array/calibration.csv            per-element state (kind "calibration")
 *   charts/*.svg                     figures (kind "chart")
 *   datasets/<id>/...                optional snapshot data (kind "dataset")
 *   runs/<id>.json                   optional estimate runs (kind "estimate-run")
 *   summary.txt                      plain-text summary (kind "summary")
 */
import { createHash } from 'node:crypto';
import JSZip from 'jszip';
import { z } from 'zod';
import { DEFAULT_UNZIP_LIMITS, UnzipError, safeUnzip, type UnzipLimits } from './safe-unzip';

export const BUNDLE_FORMAT = 'steerwise-bundle';
export const BUNDLE_SCHEMA_VERSION = 1;
export const MANIFEST_PATH = 'manifest.json';

export const bundleFileKindSchema = z.enum([
  'array-revision',
  'calibration',
  'chart',
  'dataset',
  'estimate-run',
  'summary',
]);
export type BundleFileKind = z.infer<typeof bundleFileKindSchema>;

const safePathSchema = z
  .string()
  .min(1)
  .max(200)
  .regex(
    /^[A-Za-z0-9][A-Za-z0-9._-]*(\/[A-Za-z0-9][A-Za-z0-9._-]*)*$/,
    'paths use letters, digits, ".", "_", "-" and "/" only, with no empty or parent segments',
  );

export const manifestFileSchema = z.object({
  path: safePathSchema,
  kind: bundleFileKindSchema,
  sha256: z.string().regex(/^[0-9a-f]{64}$/, 'sha256 must be 64 lowercase hex digits'),
  bytes: z.number().int().nonnegative(),
});

export const manifestSchema = z.object({
  format: z.literal(BUNDLE_FORMAT),
  schemaVersion: z.literal(BUNDLE_SCHEMA_VERSION),
  softwareVersion: z.string().min(1).max(40),
  createdAt: z.iso.datetime(),
  author: z.object({ name: z.string().max(200), email: z.string().max(320) }),
  title: z.string().min(1).max(200),
  files: z.array(manifestFileSchema).min(1).max(400),
});
export type BundleManifest = z.infer<typeof manifestSchema>;

export type BundleErrorCode =
  | 'archive'
  | 'missing-manifest'
  | 'bad-manifest'
  | 'unknown-schema-version'
  | 'missing-file'
  | 'unlisted-file'
  | 'checksum-mismatch';

export class BundleError extends Error {
  readonly code: BundleErrorCode;
  readonly path?: string;
  constructor(code: BundleErrorCode, message: string, path?: string) {
    super(message);
    this.name = 'BundleError';
    this.code = code;
    this.path = path;
  }
}

export interface BundleFileInput {
  path: string;
  kind: BundleFileKind;
  data: Uint8Array | string;
}

export function sha256Hex(data: Uint8Array | string): string {
  return createHash('sha256').update(data).digest('hex');
}

/** Writes a bundle. File order is kept; timestamps inside the zip are fixed to `createdAt`. */
export async function writeBundle(options: {
  title: string;
  author: { name: string; email: string };
  softwareVersion: string;
  createdAt: Date;
  files: BundleFileInput[];
}): Promise<{ zip: Uint8Array; manifest: BundleManifest }> {
  const encoded = options.files.map((file) => ({
    ...file,
    bytes: typeof file.data === 'string' ? new TextEncoder().encode(file.data) : file.data,
  }));
  const manifest: BundleManifest = manifestSchema.parse({
    format: BUNDLE_FORMAT,
    schemaVersion: BUNDLE_SCHEMA_VERSION,
    softwareVersion: options.softwareVersion,
    createdAt: options.createdAt.toISOString(),
    author: options.author,
    title: options.title,
    files: encoded.map((f) => ({ path: f.path, kind: f.kind, sha256: sha256Hex(f.bytes), bytes: f.bytes.byteLength })),
  });
  const paths = new Set<string>();
  for (const f of encoded) {
    if (f.path === MANIFEST_PATH || paths.has(f.path))
      throw new BundleError('bad-manifest', `bundle path '${f.path}' is used twice`, f.path);
    paths.add(f.path);
  }
  const zip = new JSZip();
  const date = options.createdAt;
  zip.file(MANIFEST_PATH, JSON.stringify(manifest, null, 2) + '\n', { date });
  for (const f of encoded) zip.file(f.path, f.bytes, { date });
  const bytes = await zip.generateAsync({
    type: 'uint8array',
    compression: 'DEFLATE',
    compressionOptions: { level: 6 },
  });
  return { zip: bytes, manifest };
}

/** Reads and verifies a bundle. Throws BundleError (archive problems are wrapped with code 'archive'). */
export function readBundle(
  buffer: Uint8Array,
  limits: UnzipLimits = DEFAULT_UNZIP_LIMITS,
): { manifest: BundleManifest; files: Map<string, Uint8Array> } {
  let entries: Map<string, Uint8Array>;
  try {
    entries = safeUnzip(buffer, limits);
  } catch (err) {
    if (err instanceof UnzipError) throw new BundleError('archive', err.message, err.entry);
    throw err;
  }
  const manifestBytes = entries.get(MANIFEST_PATH);
  if (!manifestBytes)
    throw new BundleError('missing-manifest', `the archive has no ${MANIFEST_PATH}; it is not a Steerwise bundle`);
  let raw: unknown;
  try {
    raw = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(manifestBytes));
  } catch {
    throw new BundleError('bad-manifest', `${MANIFEST_PATH} is not valid UTF-8 JSON`, MANIFEST_PATH);
  }
  const version = (raw as { schemaVersion?: unknown } | null)?.schemaVersion;
  if (version !== BUNDLE_SCHEMA_VERSION) {
    throw new BundleError(
      'unknown-schema-version',
      `bundle schema version ${JSON.stringify(version ?? null)} is not supported; this Steerwise reads version ${BUNDLE_SCHEMA_VERSION}`,
      MANIFEST_PATH,
    );
  }
  const parsed = manifestSchema.safeParse(raw);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new BundleError(
      'bad-manifest',
      `${MANIFEST_PATH}: ${issue.path.join('.') || '(root)'}: ${issue.message}`,
      MANIFEST_PATH,
    );
  }
  const manifest = parsed.data;
  const files = new Map<string, Uint8Array>();
  const listed = new Set<string>();
  for (const file of manifest.files) {
    if (listed.has(file.path))
      throw new BundleError('bad-manifest', `${MANIFEST_PATH} lists '${file.path}' twice`, file.path);
    listed.add(file.path);
    const data = entries.get(file.path);
    if (!data)
      throw new BundleError(
        'missing-file',
        `'${file.path}' is listed in the manifest but missing from the archive`,
        file.path,
      );
    if (data.byteLength !== file.bytes) {
      throw new BundleError(
        'checksum-mismatch',
        `'${file.path}' has ${data.byteLength} bytes; the manifest says ${file.bytes}`,
        file.path,
      );
    }
    const digest = sha256Hex(data);
    if (digest !== file.sha256) {
      throw new BundleError(
        'checksum-mismatch',
        `'${file.path}' fails its SHA-256 check (manifest ${file.sha256.slice(0, 12)}…, file ${digest.slice(0, 12)}…)`,
        file.path,
      );
    }
    files.set(file.path, data);
  }
  for (const name of entries.keys()) {
    if (name !== MANIFEST_PATH && !listed.has(name)) {
      throw new BundleError('unlisted-file', `'${name}' is in the archive but not in the manifest`, name);
    }
  }
  return { manifest, files };
}
