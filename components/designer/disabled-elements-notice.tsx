'use client';

/**
 * Explains what disabled elements mean for estimation, as lib/doa/elements.ts
 * selects them: MUSIC, Bartlett and MVDR use every enabled element at its true
 * position; ESPRIT-family methods and root-MUSIC (shift invariance / a polynomial
 * in z) use the longest run of enabled neighbours; each run says so in a warning
 * with what it costs in the Cramér–Rao bound.
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
        <strong className="font-semibold">What an estimate will do:</strong> MUSIC, Bartlett and MVDR use the{' '}
        {enabledCount} enabled elements at their true positions. ESPRIT and root-MUSIC (and any run with smoothing,
        forward–backward averaging or the single-snapshot option) use only{' '}
        {longestRun.length >= 2
          ? `elements ${longestRun.start + 1}–${longestRun.start + longestRun.length}, the longest run of enabled neighbours (${longestRun.length} elements)`
          : 'the longest run of enabled neighbours, and there is none of two or more here, so they cannot run'}
        . Each run warns which elements it used and what that costs in the Cramér–Rao bound. The beam figures above
        already leave the disabled elements out.
      </p>
    </div>
  );
}
