'use client';

/**
 * Explains what disabled elements mean for estimation, as lib/data/estimates.ts
 * enforces it: ESPRIT-family methods and root-MUSIC need the full uniform array
 * (shift invariance / a polynomial in z over every element), and the spectral
 * methods are evaluated for contiguous elements too, so an estimate on a
 * revision with disabled elements is refused with the elements named.
 */
import type { enabledSummary } from '@/lib/designer/state';

export interface DisabledElementsNoticeProps {
  summary: ReturnType<typeof enabledSummary>;
  elements: number;
}

function listIndices(indices: number[]): string {
  const names = indices.map((i) => String(i + 1));
  if (names.length <= 8) return names.join(', ');
  return `${names.slice(0, 8).join(', ')} and ${names.length - 8} more`;
}

export function DisabledElementsNotice({ summary, elements }: DisabledElementsNoticeProps) {
  const { disabled, longestRun, enabledCount } = summary;
  return (
    <div
      role="status"
      data-testid="disabled-notice"
      data-disabled={disabled.join(',')}
      className="mt-3 rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-800"
    >
      <p>
        <strong className="font-semibold">
          {disabled.length === 1
            ? `Element ${disabled[0] + 1} is disabled`
            : `Elements ${listIndices(disabled)} are disabled`}
        </strong>{' '}
        ({enabledCount} of {elements} in use). ESPRIT (LS, TLS and Unitary) and root-MUSIC rely on the array being
        shift-invariant: every element present, equally spaced. With a gap they do not apply.
      </p>
      <p className="mt-1">
        <strong className="font-semibold">What an estimate will do:</strong> it refuses to run on this revision and
        names the disabled elements, because every method here assumes a full, evenly spaced line (a gap would bias the
        spectra, not just widen them). The beam figures above already leave the disabled elements out, so you can still
        judge the damaged pattern.
      </p>
      {longestRun.length >= 2 && longestRun.length < elements ? (
        <p className="mt-1 text-xs">
          To estimate bearings, re-enable the elements or save a variant with only elements {longestRun.start + 1}–
          {longestRun.start + longestRun.length} (the longest run of enabled neighbours, {longestRun.length} elements).
        </p>
      ) : null}
    </div>
  );
}
