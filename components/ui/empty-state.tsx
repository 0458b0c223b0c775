export function EmptyState({
  title,
  children,
  points,
  icon,
}: {
  title: string;
  children: React.ReactNode;
  points?: string[];
  icon?: React.ReactNode;
}) {
  return (
    <div className="rounded-card border border-dashed border-ink-200 bg-white/60 px-6 py-10">
      <div className="mx-auto max-w-2xl">
        <div className="flex items-center gap-3">
          {icon ?? <SweepIcon />}
          <h2 className="text-lg font-semibold">{title}</h2>
        </div>
        <div className="mt-3 text-sm leading-relaxed text-ink-600">{children}</div>
        {points?.length ? (
          <ul className="mt-4 grid gap-2 sm:grid-cols-2">
            {points.map((p) => (
              <li key={p} className="flex gap-2 rounded-md bg-ink-50 px-3 py-2 text-sm text-ink-700">
                <span aria-hidden className="mt-1.5 h-1.5 w-1.5 shrink-0 rounded-full bg-glass-500" />
                {p}
              </li>
            ))}
          </ul>
        ) : null}
      </div>
    </div>
  );
}

/** A small array-and-wavefront mark used for empty states. */
export function SweepIcon() {
  return (
    <svg aria-hidden width="36" height="36" viewBox="0 0 36 36" className="shrink-0">
      <rect width="36" height="36" rx="8" className="fill-glass-50" />
      {[8, 13, 18, 23, 28].map((x) => (
        <circle key={x} cx={x} cy="26" r="1.8" className="fill-glass-600" />
      ))}
      <path d="M6 17 Q18 5 30 17" fill="none" strokeWidth="1.4" className="stroke-glass-400" />
      <path d="M10 19 Q18 11 26 19" fill="none" strokeWidth="1.4" className="stroke-glass-500" />
    </svg>
  );
}
