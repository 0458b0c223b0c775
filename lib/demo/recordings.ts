/**
 * Demo recordings for the invented Kestrel Sound Laboratory (see seed.ts).
 * Every vessel, place and trial here is fictional; the data are simulated
 * with lib/doa simulateSnapshots (seeded, so a re-seed writes identical
 * bytes) and written as real files under the data folder, then read back
 * through the same parser the upload route uses and recorded with their
 * SHA-256. Idempotent: a recording whose name already exists in the team is
 * left alone.
 *
 * Scenarios:
 * - the harbour hydrophone line hearing the trawler "Marsh Wren" and the
 *   ferry "Coldharbour" well apart (CSV with a header row and comments);
 * - the same line as the two vessels pass each other: the pair is below the
 *   resolvable gap 1/(M·d) (NPY) — the resolvability warning;
 * - a radar range recording of two close emitters (CSV);
 * - quay-wall multipath: two coherent arrivals that need spatial smoothing
 *   (the estimator warns `coherent-sources-suspected` without it) (CSV).
 */
import { soundSpeedMackenzie } from '@/lib/doa/design/medium';
import fs from 'node:fs';
import path from 'node:path';
import type { Transaction } from 'sequelize';
import { Dataset } from '@/models';
import { parseSnapshotFile, sha256File } from '../datasets';
import { simulateSnapshots, type ComplexMatrix } from '../doa';
import { dataDir } from '../env';
import { summarise } from '../storage/summary';

interface Recording {
  slug: string;
  name: string;
  format: 'csv' | 'npy';
  elements: number;
  spacingWavelengths: number;
  bearingsDeg: number[];
  powers: number[];
  noisePower: number;
  snapshots: number;
  correlation: number;
  seed: number;
  header?: string[];
  comments?: string[];
}

/** The Port Alder hydrophone line of the demo arrays: 0.25 m at 3 kHz in 9 °C, 34 ppt water at 40 m (Mackenzie 1981). */
const PORT_ALDER_LINE_SPACING = (0.25 * 3000) / soundSpeedMackenzie(9, 34, 40).speedMps;

export const DEMO_RECORDINGS: Recording[] = [
  {
    slug: 'harbour-line-two-vessels',
    name: 'Port Alder harbour line — Marsh Wren and Coldharbour',
    format: 'csv',
    elements: 16,
    spacingWavelengths: PORT_ALDER_LINE_SPACING,
    bearingsDeg: [-23.0, 31.5],
    powers: [1.0, 2.5],
    noisePower: 0.5,
    snapshots: 400,
    correlation: 0,
    seed: 4101,
    header: Array.from({ length: 16 }, (_, i) => `h${String(i + 1).padStart(2, '0')}`),
    comments: [
      '# Kestrel Sound Laboratory, Port Alder harbour wall, hut 3 (invented demo data)',
      '# 16-hydrophone line, 0.25 m spacing, analysed at 3 kHz; trawler Marsh Wren and ferry Coldharbour',
    ],
  },
  {
    slug: 'harbour-line-vessels-passing',
    name: 'Port Alder harbour line — Marsh Wren passing Coldharbour (close pair)',
    format: 'npy',
    elements: 16,
    spacingWavelengths: PORT_ALDER_LINE_SPACING,
    bearingsDeg: [4.0, 7.0],
    powers: [1.0, 1.5],
    noisePower: 0.1,
    snapshots: 300,
    correlation: 0,
    seed: 4102,
  },
  {
    slug: 'range-two-close-emitters',
    name: 'Gannet Point range trial — two close emitters',
    format: 'csv',
    elements: 10,
    spacingWavelengths: 0.5,
    bearingsDeg: [10.0, 15.0],
    powers: [1.0, 1.0],
    noisePower: 0.05,
    snapshots: 200,
    correlation: 0,
    seed: 4103,
    comments: ['# Gannet Point Radar Range, north butt: two emitters on the ridge (invented demo data)'],
  },
  {
    slug: 'quay-wall-multipath',
    name: 'Port Alder quay wall — coherent multipath (needs smoothing)',
    format: 'csv',
    elements: 12,
    spacingWavelengths: 0.5,
    bearingsDeg: [-12.0, 20.0],
    powers: [1.0, 1.0],
    noisePower: 0.05,
    snapshots: 250,
    correlation: 1,
    seed: 4104,
    comments: [
      '# Direct path and quay-wall reflection of the ferry Coldharbour: coherent arrivals (invented demo data)',
    ],
  },
];

/** 17 significant digits: parses back to the same double. */
function num(v: number): string {
  return Number.isInteger(v) ? v.toFixed(1) : v.toPrecision(17).replace(/\.?0+(e|$)/, '$1');
}

function csvText(x: ComplexMatrix, r: Recording): string {
  const m = x.rows;
  const n = x.cols;
  const lines: string[] = [...(r.comments ?? [])];
  if (r.header) lines.push(r.header.join(','));
  for (let s = 0; s < n; s++) {
    const fields: string[] = [];
    for (let e = 0; e < m; e++) {
      const re = x.re[e * n + s];
      const im = x.im[e * n + s];
      fields.push(`${num(re)}${im < 0 ? '-' : '+'}${num(Math.abs(im))}j`);
    }
    lines.push(fields.join(','));
  }
  return lines.join('\n') + '\n';
}

/** NPY version 1.0, '<c16', C order, shape (N, M). */
function npyBytes(x: ComplexMatrix): Buffer {
  const m = x.rows;
  const n = x.cols;
  let header = `{'descr': '<c16', 'fortran_order': False, 'shape': (${n}, ${m}), }`;
  const total = 10 + header.length + 1;
  header += ' '.repeat((64 - (total % 64)) % 64) + '\n';
  const pre = Buffer.from([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0, 0, 0]);
  pre.writeUInt16LE(header.length, 8);
  const data = Buffer.alloc(n * m * 16);
  for (let s = 0; s < n; s++) {
    for (let e = 0; e < m; e++) {
      const off = (s * m + e) * 16;
      data.writeDoubleLE(x.re[e * n + s], off);
      data.writeDoubleLE(x.im[e * n + s], off + 8);
    }
  }
  return Buffer.concat([pre, Buffer.from(header, 'latin1'), data]);
}

/** Writes and records the demo recordings for one team. Returns how many were added. */
export async function seedRecordings({
  teamId,
  uploadedById,
  transaction,
}: {
  teamId: number;
  uploadedById: number | null;
  transaction?: Transaction;
}): Promise<number> {
  let added = 0;
  for (const r of DEMO_RECORDINGS) {
    const existing = await Dataset.findOne({ where: { teamId, name: r.name }, transaction });
    if (existing) continue;
    const x = simulateSnapshots({
      elements: r.elements,
      spacingWavelengths: r.spacingWavelengths,
      bearingsDeg: r.bearingsDeg,
      powers: r.powers,
      noisePower: r.noisePower,
      snapshots: r.snapshots,
      seed: r.seed,
      correlation: r.correlation,
    });
    const rel = path.join('datasets', String(teamId), `demo-${r.slug}.${r.format}`);
    const file = path.join(dataDir(), rel);
    fs.mkdirSync(path.dirname(file), { recursive: true });
    const tmp = `${file}.part`;
    fs.writeFileSync(tmp, r.format === 'csv' ? csvText(x, r) : npyBytes(x));
    fs.renameSync(tmp, file);
    const parsed = await parseSnapshotFile({ path: file, format: r.format });
    const sha256 = await sha256File(file);
    await Dataset.create(
      {
        teamId,
        name: r.name,
        format: r.format,
        elements: parsed.elements,
        snapshots: parsed.snapshots,
        sha256,
        bytes: fs.statSync(file).size,
        originalName: `demo-${r.slug}.${r.format}`,
        storagePath: rel,
        arrayId: null,
        options: null,
        details: {
          ...(parsed.details as unknown as Record<string, unknown>),
          summary: summarise(parsed),
          demo: { simulated: true, seed: r.seed, trueBearingsDeg: r.bearingsDeg, correlation: r.correlation },
        },
        uploadedById,
      },
      { transaction },
    );
    added++;
  }
  return added;
}
