import 'server-only';
/**
 * Builds the hand-off bundle of one array revision (README "Hand-off bundle
 * format"): the revision as JSON, per-element calibration as CSV, the beam
 * pattern and separation-versus-aperture charts as SVG, a plain-text summary,
 * and optionally chosen datasets (file + metadata) and estimate runs (inputs
 * + results), each listed with its SHA-256 in manifest.json (lib/bundle).
 */
import fs from 'node:fs';
import type { Caller } from '@/lib/auth';
import { recordAudit } from '@/lib/data/record-audit';
import { loadArrayBundleSources, type BundleSelection } from '@/lib/data/bundles';
import { writeBundle, sha256Hex, type BundleFileInput, type BundleManifest } from '@/lib/bundle/bundle';
import {
  BEAM_CHART_PATH,
  CALIBRATION_PATH,
  REVISION_PATH,
  SEPARATION_CHART_PATH,
  SUMMARY_PATH,
  type BundleDatasetJson,
  type BundleRevisionJson,
  type BundleRunJson,
} from '@/lib/bundle/contents';
import { arrayInputSchema, type ArrayInput } from '@/lib/validations/array';
import { normalizeDraft, type DesignerDraft } from '@/lib/designer/state';
import { designFigures, pairAdvice } from '@/lib/designer/analysis';
import { beamPatternSvg, separationChartSvg } from './charts';
import { storedResults } from './runs';
import { expandStoredResult, type StoredMethodResult } from '@/lib/jobs/estimate-run';
import { withInlineSnapshots } from '@/lib/storage/snapshots';
import { ensureLocalFile } from '@/lib/storage/shared';
import { SOFTWARE_VERSION } from '@/lib/version';

const iso = (d: Date | string) => new Date(d).toISOString();
const parseJson = <T>(v: unknown): T => (typeof v === 'string' ? JSON.parse(v) : v) as T;

/** A stored run result with what runs store compactly (MDL/AIC, 95% intervals) rebuilt: bundles carry it in full. */
function fullResult(result: Record<string, unknown>): Record<string, unknown> {
  const list = (result as { results?: StoredMethodResult[] }).results;
  return Array.isArray(list) ? { ...result, results: list.map(expandStoredResult) } : result;
}

/** A file name: lower-case letters, digits and hyphens. */
/** One line on what a run applied: the calibration and the disabled elements (read from its inputs). */
export function runConditions(inputs: Record<string, unknown>): string {
  const cal = inputs.calibration as { applied?: boolean; revision?: number; note?: string } | undefined;
  const disabled = (inputs.array as { disabledElements?: number[] } | undefined)?.disabledElements ?? [];
  const calText = !cal
    ? 'calibration: none recorded (run stored before calibrations were applied)'
    : cal.applied
      ? `calibration of revision ${cal.revision} applied (gains in the run file; a re-run divides by them again)`
      : `calibration not applied${cal.note ? `: ${cal.note}` : ''}`;
  const elText = disabled.length
    ? `disabled elements ${disabled.join(', ')} left out (see the run's element-subset warnings)`
    : 'all elements used';
  return `${calText}; ${elText}.`;
}

export function slug(text: string, fallback = 'array'): string {
  const s = text
    .normalize('NFKD')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 60);
  return s || fallback;
}

/** Per-element state as CSV: position along the axis, enabled, gain and phase calibration. */
export function calibrationCsv(draft: DesignerDraft, spacingWavelengths: number, wavelengthM?: number): string {
  const lines = ['element,position_wavelengths,position_m,enabled,gain_db,phase_deg'];
  draft.elementStates.forEach((e, m) => {
    const pos = m * spacingWavelengths;
    lines.push(
      [m, pos, wavelengthM !== undefined ? pos * wavelengthM : '', e.enabled ? 1 : 0, e.gainDb, e.phaseDeg].join(','),
    );
  });
  return lines.join('\n') + '\n';
}

const f = (v: number | null | undefined, digits = 3, unit = '') =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : `${v.toFixed(digits)}${unit}`;

function mediumText(draft: DesignerDraft): string {
  const m = draft.medium;
  switch (m.kind) {
    case 'radio':
      return 'radio (speed of light)';
    case 'sea-water':
      return `sea water, ${m.temperatureC} °C, ${m.salinityPpt} ppt, ${m.depthM} m depth (${m.equation})`;
    case 'fresh-water':
      return `fresh water, ${m.temperatureC} °C`;
    case 'air':
      return `air, ${m.temperatureC} °C`;
    case 'custom':
      return `custom speed ${m.speedMps} m/s`;
  }
}

/** The plain-text summary: figures, cautions, contents, and how to check the files without the app. */
export function summaryText({
  draft,
  revision,
  arrayName,
  author,
  createdAt,
  signOffs,
  datasets,
  runs,
  datasetsLeftOut,
  exportedBy,
}: {
  draft: DesignerDraft;
  revision: number;
  arrayName: string;
  author: string;
  createdAt: string;
  signOffs: BundleRevisionJson['signOffs'];
  datasets: BundleDatasetJson[];
  runs: BundleRunJson[];
  datasetsLeftOut: boolean;
  exportedBy: string;
}): string {
  const fig = designFigures(draft);
  const pairs = pairAdvice(draft);
  const disabled = draft.elementStates.map((e, i) => (e.enabled ? -1 : i)).filter((i) => i >= 0);
  const calibrated = draft.elementStates.filter((e) => e.gainDb !== 0 || e.phaseDeg !== 0).length;
  const L: string[] = [];
  L.push(`STEERWISE HAND-OFF: ${arrayName}, revision ${revision}`);
  L.push('='.repeat(Math.min(78, L[0].length)));
  L.push(
    `Revision saved ${createdAt} by ${author}. Bundle written ${new Date().toISOString()} by ${exportedBy} (Steerwise ${SOFTWARE_VERSION}).`,
  );
  L.push('');
  L.push('ARRAY');
  L.push(
    `  Uniform linear array of ${draft.elements} elements, spacing ${draft.spacing.value} ${draft.spacing.unit === 'wavelength' ? 'λ' : draft.spacing.unit} = ${fig.spacingWavelengths.toPrecision(6)} λ.`,
  );
  if (draft.frequencyHz !== undefined)
    L.push(
      `  Analysis frequency ${draft.frequencyHz} Hz; medium ${mediumText(draft)}; wavelength ${f(fig.geometry.wavelengthM, 6, ' m')}.`,
    );
  else L.push('  No analysis frequency: the spacing is known in wavelengths only.');
  L.push(
    `  Steering ${draft.steerDeg}°, scan sector ±${draft.scanSectorDeg}°, taper ${draft.taper.kind === 'chebyshev' ? `Chebyshev ${draft.taper.sidelobeDb} dB` : draft.taper.kind}.`,
  );
  L.push(
    `  Elements disabled: ${disabled.length ? disabled.join(', ') : 'none'}; elements with gain/phase calibration: ${calibrated} (see array/calibration.csv).`,
  );
  L.push('');
  L.push('FIGURES (computed by the Steerwise engine; angles in degrees from broadside)');
  L.push(
    `  Aperture                      ${f(fig.apertureWavelengths, 3, ' λ')}${fig.apertureM !== undefined ? ` (${f(fig.apertureM, 4, ' m')})` : ''}`,
  );
  L.push(
    `  Half-power beamwidth          ${f(fig.halfPowerBeamwidthDeg, 3, '°')}${fig.halfPowerClipped ? ' (clipped at endfire)' : ''}`,
  );
  L.push(
    `  First-null beamwidth          ${f(fig.firstNullBeamwidthDeg, 3, '°')}${fig.firstNullClipped ? ' (clipped at endfire)' : ''}`,
  );
  L.push(
    `  Peak sidelobe                 ${f(fig.peakSidelobeDb, 2, ' dB')}${fig.peakSidelobeAtDeg !== null ? ` at ${f(fig.peakSidelobeAtDeg, 2, '°')}` : ''}`,
  );
  L.push(`  Grating-lobe-free scan        ±${f(fig.gratingLobeFreeScanDeg, 2, '°')}`);
  L.push(
    `  Rayleigh gap (broadside)      ${f(fig.rayleighGapDegAtBroadside, 3, '°')} (Δu = ${fig.rayleighGapU.toPrecision(4)})`,
  );
  L.push(`  Planning case                 ${draft.snrDb} dB SNR per element, ${draft.snapshots} snapshots`);
  L.push('');
  L.push('CAUTIONS');
  const cautions: string[] = [];
  if (fig.beamError) cautions.push(`The beam figures could not be computed: ${fig.beamError}.`);
  if (fig.scanExceedsGratingFree)
    cautions.push(
      `The scan sector ±${draft.scanSectorDeg}° exceeds the grating-lobe-free scan ±${f(fig.gratingLobeFreeScanDeg, 2, '°')}: grating lobes enter visible space. Reduce the spacing to at most ${f(fig.maxSpacingForScanWavelengths, 3, ' λ')}.`,
    );
  if (disabled.length)
    cautions.push(
      `${disabled.length} element(s) are disabled: the array is no longer uniform. MUSIC, Bartlett and MVDR use the enabled elements at their true positions; ESPRIT-family methods (which need shift invariance) and root-MUSIC use the longest run of enabled neighbours, with a larger Cramér–Rao bound.`,
    );
  for (const w of fig.geometry.warnings) if (w.code !== 'no-frequency') cautions.push(w.message);
  for (const p of pairs)
    if (p.verdict !== 'resolvable')
      cautions.push(`${p.outcome}${p.fixes.length ? ` Fixes: ${p.fixes.join(' ')}` : ''}`);
  cautions.push(
    'Estimates are advisory: the Cramér–Rao bound limits the variance of unbiased estimators and guarantees nothing for one estimate; calibration errors, coupling, near-field, wideband or coherent sources break the model. A line array measures a cone angle and cannot tell left from right.',
  );
  for (const c of cautions) L.push(`  - ${c}`);
  L.push('');
  if (pairs.length) {
    L.push('PLANNED SOURCE PAIRS');
    for (const p of pairs)
      L.push(`  - sources ${p.i + 1}/${p.j + 1} at ${p.bearingsDeg[0]}° and ${p.bearingsDeg[1]}°: ${p.verdict}`);
    L.push('');
  }
  L.push('SIGN-OFF');
  if (signOffs.length)
    for (const s of signOffs) L.push(`  Approved by ${s.by} at ${s.at}${s.note ? `: "${s.note}"` : ''}`);
  else L.push('  This revision had no sign-off when the bundle was written.');
  L.push('');
  L.push('DATASETS');
  if (datasets.length)
    for (const d of datasets)
      L.push(
        `  - ${d.file}: "${d.name}", ${d.fileFormat}, ${d.elements} elements × ${d.snapshots} snapshots, SHA-256 ${d.sha256}`,
      );
  else
    L.push(
      datasetsLeftOut
        ? '  Dataset files were left out: your role may not export them in this team.'
        : '  None included.',
    );
  L.push('');
  L.push('ESTIMATE RUNS');
  if (runs.length === 0) L.push('  None included.');
  for (const r of runs) {
    let results: string;
    try {
      results = storedResults(r.result)
        .map((m) => `${m.method}: ${m.bearingsDeg.map((b) => b.toFixed(4) + '°').join(', ') || 'no bearings'}`)
        .join('; ');
    } catch (err) {
      results = `(result not readable: ${(err as Error).message})`;
    }
    L.push(
      `  - run ${r.originalId} (${r.createdAt}, ${r.softwareVersion})${r.dataset ? ` on ${r.dataset}` : ''}: ${results}`,
    );
    L.push(`    ${runConditions(r.inputs)}`);
  }
  L.push('');
  L.push('CHECKING THE FILES WITHOUT STEERWISE');
  L.push('  manifest.json lists every file with its SHA-256 and size. On a Unix shell:');
  L.push('    sha256sum array/revision.json   # compare with the manifest entry');
  L.push(
    '  Charts are plain SVG (open in a browser); calibration and datasets are CSV or the uploaded file as received.',
  );
  L.push(
    '  Import the whole bundle in Steerwise (Hand-off page) to get a new array in your team and re-run the estimates.',
  );
  return L.join('\n') + '\n';
}

/** Builds the bundle; checks team ownership of everything chosen. Records an audit entry. */
export async function buildArrayBundle({
  caller,
  arrayId,
  selection = {},
  audit = true,
}: {
  caller: Caller;
  arrayId: number;
  selection?: BundleSelection;
  audit?: boolean;
}): Promise<{ zip: Uint8Array; fileName: string; manifest: BundleManifest; revision: number; sha256: string }> {
  const { array, rev, runs, datasets, author, signOffs, datasetsAllowed } = await loadArrayBundleSources({
    caller,
    arrayId,
    selection,
  });
  const config = parseJson<Record<string, unknown>>(rev.config);
  const parsedConfig = arrayInputSchema.safeParse(config);
  if (!parsedConfig.success)
    throw new Error(
      `stored config of array ${array.id} revision ${rev.revision} does not validate: ${parsedConfig.error.message}`,
    );
  const input: ArrayInput = parsedConfig.data;
  const draft = normalizeDraft(input);
  const fig = designFigures(draft);

  const revisionJson: BundleRevisionJson = {
    format: 'steerwise-array-revision',
    name: array.name,
    revision: rev.revision,
    createdAt: iso(rev.createdAt),
    author: author ? { name: author.name, email: author.email } : null,
    elements: rev.elements,
    spacingWavelengths: rev.spacingWavelengths,
    frequencyHz: rev.frequencyHz ?? null,
    propagationSpeedMps: rev.propagationSpeedMps ?? null,
    config,
    signOffs,
  };

  const files: BundleFileInput[] = [
    { path: REVISION_PATH, kind: 'array-revision', data: JSON.stringify(revisionJson, null, 2) + '\n' },
    {
      path: CALIBRATION_PATH,
      kind: 'calibration',
      data: calibrationCsv(draft, fig.spacingWavelengths, fig.geometry.wavelengthM),
    },
    { path: BEAM_CHART_PATH, kind: 'chart', data: beamPatternSvg(draft) },
    { path: SEPARATION_CHART_PATH, kind: 'chart', data: separationChartSvg(draft) },
  ];

  const datasetJsons: BundleDatasetJson[] = [];
  for (const d of datasets) {
    const ext = (d.originalName.match(/\.([A-Za-z0-9]{1,8})$/)?.[1] ?? d.format).toLowerCase();
    const folder = `datasets/${d.id}`;
    const bytes = await fs.promises.readFile(await ensureLocalFile(d.storagePath));
    if (sha256Hex(bytes) !== d.sha256) throw new Error(`stored file of dataset ${d.id} no longer matches its SHA-256`);
    const meta: BundleDatasetJson = {
      format: 'steerwise-dataset',
      originalId: d.id,
      name: d.name,
      fileFormat: d.format,
      elements: d.elements,
      snapshots: d.snapshots,
      sha256: d.sha256,
      bytes: Number(d.bytes),
      originalName: d.originalName,
      options: parseJson<Record<string, unknown> | null>(d.options ?? null),
      createdAt: iso(d.createdAt),
      file: `${folder}/data.${ext}`,
    };
    datasetJsons.push(meta);
    files.push({ path: `${folder}/dataset.json`, kind: 'dataset', data: JSON.stringify(meta, null, 2) + '\n' });
    files.push({ path: meta.file, kind: 'dataset', data: new Uint8Array(bytes) });
  }

  const runJsons: BundleRunJson[] = [];
  for (const r of runs) {
    // A run's stored snapshot set travels inline, as request.snapshots (lib/storage/snapshots.ts).
    const inputs = datasetsAllowed
      ? await withInlineSnapshots({ ...parseJson<Record<string, unknown>>(r.inputs) })
      : { ...parseJson<Record<string, unknown>>(r.inputs) };
    if (!datasetsAllowed) {
      // Inline snapshots are data too.
      delete inputs.snapshots;
      delete inputs.snapshotSet;
      if (inputs.request && typeof inputs.request === 'object') {
        const { snapshots: _s, ...request } = inputs.request as Record<string, unknown>;
        void _s;
        inputs.request = request;
      }
    }
    const ds = r.datasetId ? datasets.find((d) => d.id === r.datasetId) : undefined;
    const run: BundleRunJson = {
      format: 'steerwise-estimate-run',
      originalId: r.id,
      createdAt: iso(r.createdAt),
      softwareVersion: r.softwareVersion,
      datasetSha256: r.datasetSha256 ?? null,
      dataset: ds ? `datasets/${ds.id}` : null,
      inputs,
      result: fullResult(parseJson<Record<string, unknown>>(r.result ?? {})),
    };
    runJsons.push(run);
    files.push({ path: `runs/${r.id}.json`, kind: 'estimate-run', data: JSON.stringify(run, null, 2) + '\n' });
  }

  files.push({
    path: SUMMARY_PATH,
    kind: 'summary',
    data: summaryText({
      draft,
      revision: rev.revision,
      arrayName: array.name,
      author: author ? `${author.name} <${author.email}>` : 'a former member',
      createdAt: iso(rev.createdAt),
      signOffs,
      datasets: datasetJsons,
      runs: runJsons,
      datasetsLeftOut: !datasetsAllowed && runs.some((r) => r.datasetId),
      exportedBy: `${caller.name} <${caller.email}>`,
    }),
  });

  const { zip, manifest } = await writeBundle({
    title: `${array.name}, revision ${rev.revision}`.slice(0, 200),
    author: { name: caller.name, email: caller.email },
    softwareVersion: SOFTWARE_VERSION,
    createdAt: new Date(),
    files,
  });
  const sha256 = sha256Hex(zip);
  if (audit) {
    await recordAudit({
      teamId: caller.teamId,
      userId: caller.id,
      action: 'bundle.exported',
      target: array.name,
      detail: {
        arrayId: array.id,
        revision: rev.revision,
        datasets: datasets.map((d) => d.id),
        runs: runs.map((r) => r.id),
        bytes: zip.byteLength,
        sha256,
      },
    });
  }
  return {
    zip,
    fileName: `${slug(array.name)}-r${rev.revision}.steerwise.zip`,
    manifest,
    revision: rev.revision,
    sha256,
  };
}
