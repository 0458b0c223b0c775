/**
 * Re-executing an estimate run that came in a bundle and comparing its
 * bearings with the stored ones.
 *
 * A run stores its inputs as lib/data/estimates.ts writes them
 * (`{request, methods, options, array, dataset?}`, where `request` is the body
 * of POST /api/v1/estimates) and its answer (`result.results: [{method,
 * bearingsDeg, …}]`). The flat v1 body (`method`, `sourceCount`, … at the top
 * level) and a single answer with `bearingsDeg` are read too. The same
 * options are given again to lib/doa estimateBearings on the imported data,
 * in the file layout (N × M, one snapshot per row) as the runs use it, and
 * bearings (degrees from broadside, ascending) are compared element by element
 * (lib/runs/compare.ts: the one definition of "reproduced").
 */
import { estimateBearings, type ComplexMatrix } from '@/lib/doa';
import { applyElementGains, complexGains, type ElementGainState } from '@/lib/doa/calibration';
import { bundleRunImperfectionsSchema } from '@/lib/bundle/contents';
import { DOA_METHODS, type DoaMethod } from '@/lib/doa/methods/registry';
import type { RunOptions } from '@/lib/jobs/estimate-run';
import { compareBearings, type MethodComparison } from '@/lib/runs/compare';

export interface StoredMethodResult {
  method: DoaMethod;
  bearingsDeg: number[];
}

/** A stored run's covariance and source-count options (as lib/jobs runs them) plus its methods. */
export type RerunOptions = Omit<RunOptions, 'includeSpectrum'> & { methods: DoaMethod[] };

export interface RunComparison {
  reproduced: boolean;
  methods: MethodComparison[];
  /** Why the run could not be re-executed at all (no data, bad options). */
  error?: string;
}

const isMethod = (v: unknown): v is DoaMethod =>
  typeof v === 'string' && (DOA_METHODS as readonly string[]).includes(v);
const isNumberList = (v: unknown): v is number[] =>
  Array.isArray(v) && v.every((x) => typeof x === 'number' && Number.isFinite(x));

/** The method results stored in a run's `result`; throws a plain Error naming what is missing. */
export function storedResults(result: unknown): StoredMethodResult[] {
  if (!result || typeof result !== 'object') throw new Error('the run has no stored result');
  const r = result as { results?: unknown; method?: unknown; bearingsDeg?: unknown };
  const list = Array.isArray(r.results) ? r.results : [r];
  const out: StoredMethodResult[] = [];
  list.forEach((entry, i) => {
    const e = (entry ?? {}) as { method?: unknown; bearingsDeg?: unknown };
    if (!isMethod(e.method))
      throw new Error(
        `result ${i + 1}: method ${JSON.stringify(e.method ?? null)} is not one of ${DOA_METHODS.join(', ')}`,
      );
    if (!isNumberList(e.bearingsDeg))
      throw new Error(`result ${i + 1} (${e.method}): bearingsDeg is not a list of finite numbers`);
    out.push({ method: e.method, bearingsDeg: e.bearingsDeg });
  });
  if (out.length === 0) throw new Error('the run stores no method results');
  return out;
}

/** The estimation options of a run's `inputs`; throws a plain Error naming the bad option. */
export function rerunOptions(inputs: unknown): RerunOptions {
  if (!inputs || typeof inputs !== 'object') throw new Error('the run has no stored inputs');
  const top = inputs as Record<string, unknown>;
  // Stored layout: {methods, options:{…}}; flat v1 body: {method, sourceCount, …}.
  const i = (top.options && typeof top.options === 'object' ? top.options : top) as Record<string, unknown>;
  const methods = Array.isArray(top.methods) ? top.methods : top.method !== undefined ? [top.method] : [];
  if (methods.length === 0 || !methods.every(isMethod))
    throw new Error(`inputs.method(s) ${JSON.stringify(i.methods ?? i.method ?? null)} name no known method`);
  const out: RerunOptions = { methods: methods as DoaMethod[] };
  const int = (key: string) => {
    const v = i[key];
    if (v === undefined || v === null) return undefined;
    if (typeof v !== 'number' || !Number.isInteger(v)) throw new Error(`inputs.${key} must be a whole number`);
    return v;
  };
  const bool = (key: string) => {
    const v = i[key];
    if (v === undefined || v === null) return undefined;
    if (typeof v !== 'boolean') throw new Error(`inputs.${key} must be true or false`);
    return v;
  };
  out.sourceCount = int('sourceCount');
  if (i.sourceCountRule !== undefined && i.sourceCountRule !== null) {
    if (i.sourceCountRule !== 'mdl' && i.sourceCountRule !== 'aic')
      throw new Error('inputs.sourceCountRule must be "mdl" or "aic"');
    out.sourceCountRule = i.sourceCountRule;
  }
  out.forwardBackward = bool('forwardBackward');
  out.smoothingSubarray = int('smoothingSubarray');
  out.singleSnapshot = bool('singleSnapshot');
  out.singleSnapshotSubarray = int('singleSnapshotSubarray');
  return out;
}

/** Inline snapshots of a run's inputs ({re, im}: N rows of M) as an N × M matrix (file layout), or null when the run used a dataset. */
export function inlineSnapshots(inputs: unknown): ComplexMatrix | null {
  type Snap = { snapshots?: { re?: unknown; im?: unknown } };
  const top = inputs as (Snap & { request?: Snap }) | null;
  const s = top?.request?.snapshots ?? top?.snapshots;
  if (!s) return null;
  const re = s.re as number[][];
  const im = s.im as number[][];
  if (!Array.isArray(re) || !Array.isArray(im) || re.length === 0 || re.length !== im.length)
    throw new Error('inputs.snapshots must hold {re, im} with the same number of rows');
  const n = re.length;
  const m = re[0]?.length ?? 0;
  const out: ComplexMatrix = { rows: n, cols: m, re: new Float64Array(m * n), im: new Float64Array(m * n) };
  for (let r = 0; r < n; r++) {
    if (!isNumberList(re[r]) || !isNumberList(im[r]) || re[r].length !== m || im[r].length !== m)
      throw new Error(`inputs.snapshots row ${r + 1} is not ${m} finite numbers in re and im`);
    for (let c = 0; c < m; c++) {
      out.re[r * m + c] = re[r][c];
      out.im[r * m + c] = im[r][c];
    }
  }
  return out;
}

/**
 * The calibration a run applied (gains, or null) and its enabled elements (0-based, or null when
 * none is disabled), from `inputs.calibration` and `inputs.array.disabledElements`; throws a plain
 * Error naming the bad field or a count that does not fit the data's `elements`.
 */
export function runImperfections(
  inputs: unknown,
  elements: number,
): { gains: ElementGainState[] | null; enabledIndices: number[] | null } {
  const parsed = bundleRunImperfectionsSchema.safeParse(inputs ?? {});
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new Error(`inputs.${issue.path.join('.')}: ${issue.message}`);
  }
  const cal = parsed.data.calibration;
  let gains: ElementGainState[] | null = null;
  if (cal?.applied) {
    if (!cal.gains) throw new Error('inputs.calibration says applied but holds no gains');
    if (cal.gains.length !== elements)
      throw new Error(`inputs.calibration.gains has ${cal.gains.length} entries but the data has ${elements} elements`);
    gains = cal.gains;
  }
  const disabled = parsed.data.array?.disabledElements ?? [];
  if (disabled.some((e) => e > elements))
    throw new Error(`inputs.array.disabledElements names an element above ${elements}`);
  const off = new Set(disabled);
  const enabledIndices = disabled.length
    ? Array.from({ length: elements }, (_, i) => i).filter((i) => !off.has(i + 1))
    : null;
  return { gains, enabledIndices };
}

/**
 * Re-executes every method of a run on `rows` (N × M, one snapshot per row) and compares with what
 * it stored, dividing by the calibration the run applied and keeping its disabled elements off.
 */
export function reproduceRun({
  rows,
  spacingWavelengths,
  inputs,
  result,
}: {
  rows: ComplexMatrix;
  spacingWavelengths: number;
  inputs: unknown;
  result: unknown;
}): RunComparison {
  let options: RerunOptions;
  let stored: StoredMethodResult[];
  let imperfections: ReturnType<typeof runImperfections>;
  try {
    options = rerunOptions(inputs);
    stored = storedResults(result);
    imperfections = runImperfections(inputs, rows.cols);
  } catch (err) {
    return { reproduced: false, methods: [], error: (err as Error).message };
  }
  const data = imperfections.gains
    ? applyElementGains(rows, complexGains(imperfections.gains), 'snapshots-by-elements')
    : rows;
  const methods: MethodComparison[] = [];
  for (const s of stored) {
    try {
      const { methods: _all, ...rest } = options;
      void _all;
      const answer = estimateBearings({
        rows: data,
        spacingWavelengths,
        method: s.method,
        ...rest,
        ...(imperfections.enabledIndices ? { elementIndices: imperfections.enabledIndices } : {}),
      });
      methods.push(compareBearings(s.method, s.bearingsDeg, answer.bearingsDeg));
    } catch (err) {
      methods.push({
        method: s.method,
        storedDeg: s.bearingsDeg,
        recomputedDeg: [],
        differencesDeg: null,
        maxAbsDifferenceDeg: null,
        reproduced: false,
        message: `${s.method}: re-running failed: ${(err as Error).message}`,
      });
    }
  }
  return { reproduced: methods.length > 0 && methods.every((m) => m.reproduced), methods };
}

/** The run's inputs with the ids of the source team replaced by the new records' ids. */
export function remapRunInputs(
  inputs: Record<string, unknown>,
  ids: { datasetId: number | null; arrayId: number; arrayRevisionId: number },
): Record<string, unknown> {
  const out: Record<string, unknown> = JSON.parse(JSON.stringify(inputs));
  const fix = (o: Record<string, unknown> | undefined) => {
    if (!o || typeof o !== 'object') return;
    if ('datasetId' in o) o.datasetId = ids.datasetId ?? undefined;
    if ('arrayId' in o) o.arrayId = ids.arrayId;
    if ('arrayRevisionId' in o) o.arrayRevisionId = ids.arrayRevisionId;
    if ('revision' in o && 'arrayRevisionId' in o) o.revision = 1;
  };
  fix(out);
  fix(out.request as Record<string, unknown>);
  fix(out.array as Record<string, unknown>);
  fix(out.calibration as Record<string, unknown>);
  const ds = out.dataset as Record<string, unknown> | undefined;
  if (ds && typeof ds === 'object') {
    if (ids.datasetId === null) delete out.dataset;
    else ds.id = ids.datasetId;
  }
  return JSON.parse(JSON.stringify(out));
}
