'use client';
import useSWR from 'swr';
import Link from 'next/link';
import { fetcher } from '@/lib/client/fetcher';
import { FormMessage } from '@/components/ui/field';
import { ProgressBar } from '@/components/ui/progress-bar';

type StudyState = {
  id: number;
  status: 'queued' | 'running' | 'done' | 'failed';
  progress: number;
  error: string | null;
  inputs: { spec: { trials: number } };
  result: {
    points: {
      crbRmsDeg: number;
      methods: { rmseDeg: number; resolutionProbability: number | null; outlierRate: number }[];
    }[];
  } | null;
};

export type Verification = {
  elements: number;
  snapshots: number;
  predictedStdDeg: number;
  accuracyDeg: number;
  resolveDeg?: number;
  resolutionProbability?: number;
  statisticalResolutionDeg: number | null;
  accuracyStudyId: number;
  resolutionStudyId?: number;
};

function useStudy(id: number | undefined) {
  return useSWR<StudyState>(id ? `/api/v1/studies/${id}` : null, fetcher, {
    refreshInterval: (s) => (s && (s.status === 'queued' || s.status === 'running') ? 700 : 0),
  });
}

function Progress({ study, label }: { study: StudyState | undefined; label: string }) {
  if (!study || study.status === 'done') return null;
  if (study.status === 'failed') return <FormMessage tone="error">{study.error ?? 'The study failed.'}</FormMessage>;
  return (
    <div className="text-sm text-ink-600">
      <p>
        {label}: {study.status === 'queued' ? 'queued' : `running, ${Math.round(study.progress * 100)} %`}
      </p>
      <ProgressBar fraction={study.progress} label={`${label} progress`} className="mt-1" />
    </div>
  );
}

/** Predicted against simulated, side by side, once the verification studies finish (polled). */
export function VerifyPanel({ v }: { v: Verification }) {
  const acc = useStudy(v.accuracyStudyId).data;
  const res = useStudy(v.resolutionStudyId).data;
  const accPoint = acc?.status === 'done' ? acc.result?.points[0]?.methods[0] : undefined;
  const resPoint = res?.status === 'done' ? res.result?.points[0]?.methods[0] : undefined;
  const trials = acc?.inputs.spec.trials ?? 0;
  const half = trials ? 1.96 / Math.sqrt(2 * trials) : 0;
  const resTrials = res?.inputs.spec.trials ?? 0;
  const p = resPoint?.resolutionProbability ?? null;
  const pHalf = p !== null && resTrials ? 1.96 * Math.sqrt((p * (1 - p)) / resTrials) : 0;
  return (
    <div className="grid gap-3 p-5" aria-live="polite">
      <p className="text-sm text-ink-700">
        Candidate {v.elements} elements × {v.snapshots} snapshots.{' '}
        <Link className="text-glass-700 hover:underline" href={`/studies/${v.accuracyStudyId}`}>
          Accuracy study
        </Link>
        {v.resolutionStudyId ? (
          <>
            {' · '}
            <Link className="text-glass-700 hover:underline" href={`/studies/${v.resolutionStudyId}`}>
              Resolution study
            </Link>
          </>
        ) : null}
      </p>
      <Progress study={acc} label="Accuracy study" />
      <Progress study={res} label="Resolution study" />
      <table className="w-full text-left text-sm" aria-label="Predicted against simulated">
        <thead className="text-2xs tracking-wide text-ink-500 uppercase">
          <tr>
            <th scope="col" className="py-1 pr-4">
              Figure
            </th>
            <th scope="col" className="py-1 pr-4">
              Target
            </th>
            <th scope="col" className="py-1 pr-4">
              Predicted
            </th>
            <th scope="col" className="py-1 pr-4">
              Simulated (95 % interval)
            </th>
            <th scope="col" className="py-1">
              Verdict
            </th>
          </tr>
        </thead>
        <tbody className="tabular">
          <tr className="border-t border-ink-100">
            <th scope="row" className="py-1.5 pr-4 font-medium">
              Bearing RMSE
            </th>
            <td className="pr-4">≤ {v.accuracyDeg}°</td>
            <td className="pr-4">{v.predictedStdDeg.toPrecision(3)}°</td>
            <td className="pr-4" data-testid="simulated-rmse">
              {accPoint
                ? `${accPoint.rmseDeg.toPrecision(3)}° (${(accPoint.rmseDeg * (1 - half)).toPrecision(3)}–${(accPoint.rmseDeg * (1 + half)).toPrecision(3)}°)${accPoint.outlierRate > 0 ? `, ${(accPoint.outlierRate * 100).toFixed(1)} % outliers` : ''}`
                : '…'}
            </td>
            <td>
              {accPoint
                ? accPoint.rmseDeg * (1 - half) <= v.accuracyDeg
                  ? 'meets the target'
                  : 'misses the target'
                : ''}
            </td>
          </tr>
          {v.resolveDeg !== undefined ? (
            <tr className="border-t border-ink-100">
              <th scope="row" className="py-1.5 pr-4 font-medium">
                Resolution of a pair {v.resolveDeg}° apart
              </th>
              <td className="pr-4">
                {v.resolutionProbability !== undefined ? `P ≥ ${v.resolutionProbability}` : 'resolved'}
              </td>
              <td className="pr-4">
                above Smith limit ({v.statisticalResolutionDeg?.toPrecision(3) ?? '–'}°); P not modelled
              </td>
              <td className="pr-4" data-testid="simulated-resolution">
                {p !== null
                  ? `P = ${p.toFixed(3)} (${Math.max(0, p - pHalf).toFixed(3)}–${Math.min(1, p + pHalf).toFixed(3)})`
                  : '…'}
              </td>
              <td>
                {p !== null && v.resolutionProbability !== undefined
                  ? p + pHalf >= v.resolutionProbability
                    ? 'meets the target'
                    : 'misses the target'
                  : ''}
              </td>
            </tr>
          ) : null}
        </tbody>
      </table>
      <p className="text-xs text-ink-500">
        The RMSE interval is the normal approximation RMSE·(1 ± 1.96/√(2T)) for T trials; the probability interval is
        the normal approximation of a proportion. A seeded simulation of the ideal model: real arrays add calibration
        and position errors.
      </p>
    </div>
  );
}
