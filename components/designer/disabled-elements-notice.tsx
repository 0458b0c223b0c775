'use client';

/**
 * Explains what disabled elements mean for estimation. The policy stated here
 * (for the estimates work to honour): ESPRIT-family methods and root-MUSIC need
 * the full uniform array (shift invariance / a polynomial in z over every
 * element) and are refused; MUSIC, Bartlett and MVDR run on the enabled
 * elements only, with steering vectors at their true positions m·d.
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
    <div role="status" data-testid="disabled-notice" data-disabled={disabled.join(',')} className="mt-3 rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-800">
      <p>
        <strong className="font-semibold">
          {disabled.length === 1 ? `Element ${disabled[0] + 1} is disabled` : `Elements ${listIndices(disabled)} are disabled`}
        </strong>{' '}
        ({enabledCount} of {elements} in use). ESPRIT (LS, TLS and Unitary) and root-MUSIC rely on the array being shift-invariant: every element present, equally spaced. With a gap
        they do not apply.
      </p>
      <p className="mt-1">
        <strong className="font-semibold">What an estimate will do:</strong> it refuses ESPRIT and root-MUSIC for this array, with this explanation, and runs MUSIC, Bartlett and MVDR
        on the {enabledCount} enabled elements at their true positions. The beam figures above already leave the disabled elements out.
      </p>
      {longestRun.length >= 2 && longestRun.length < elements ? (
        <p className="mt-1 text-xs">
          To use ESPRIT, save a variant with only elements {longestRun.start + 1}–{longestRun.start + longestRun.length} (the longest run of enabled neighbours, {longestRun.length}{' '}
          elements).
        </p>
      ) : null}
    </div>
  );
}
