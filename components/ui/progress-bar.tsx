import { cn } from '@/lib/client/cn';

/**
 * The one progress bar of background work (uploads, runs, studies, calibrations, records).
 * `fraction` is 0…1; the bar shows at least `minPercent` so a just-started job is visible.
 */
export function ProgressBar({
  fraction,
  label,
  minPercent = 3,
  pulse = false,
  className,
}: {
  fraction: number;
  label: string;
  minPercent?: number;
  pulse?: boolean;
  className?: string;
}) {
  const percent = fraction * 100;
  return (
    <div
      role="progressbar"
      aria-label={label}
      aria-valuemin={0}
      aria-valuemax={100}
      aria-valuenow={Math.round(percent)}
      className={cn('h-2 overflow-hidden rounded bg-ink-100', className)}
    >
      <div
        className={cn('h-full bg-glass-500 transition-[width]', pulse && 'animate-pulse')}
        style={{ width: `${Math.max(minPercent, percent)}%` }}
      />
    </div>
  );
}
