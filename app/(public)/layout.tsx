import { Brand } from '@/components/shell/nav-rail';

export default function PublicLayout({ children }: { children: React.ReactNode }) {
  return (
    <div className="grid min-h-screen lg:grid-cols-[minmax(0,5fr)_minmax(0,6fr)]">
      <aside className="relative hidden overflow-hidden bg-ink-950 px-12 py-12 text-ink-200 lg:flex lg:flex-col">
        <Brand />
        <div className="mt-auto max-w-md">
          <p className="text-2xs font-semibold tracking-[0.14em] text-glass-300 uppercase">
            Receiving arrays, done with care
          </p>
          <p className="mt-3 text-2xl leading-snug font-semibold text-white">
            Spacing without grating lobes, accuracy against the bound before hardware, and bearings you can defend.
          </p>
          <p className="mt-4 text-sm leading-relaxed text-ink-400">
            Steerwise is a team workbench for hydrophone lines, towed arrays and antenna rows. Estimates are advisory;
            follow your local rules and licensed practice.
          </p>
        </div>
        <svg
          aria-hidden
          className="pointer-events-none absolute -top-10 -right-24 opacity-40"
          width="520"
          height="520"
          viewBox="0 0 520 520"
        >
          {[60, 110, 160, 210, 260].map((r) => (
            <circle
              key={r}
              cx="260"
              cy="260"
              r={r}
              fill="none"
              stroke="#2b9986"
              strokeWidth="1"
              strokeDasharray="2 6"
            />
          ))}
          <path d="M260 260 L500 150" stroke="#75cfbd" strokeWidth="1.5" />
        </svg>
      </aside>
      <main id="main" className="flex items-center justify-center px-6 py-12">
        <div className="w-full max-w-sm">
          <div className="mb-8 rounded-md bg-ink-950 px-3 py-2 lg:hidden">
            <Brand />
          </div>
          {children}
        </div>
      </main>
    </div>
  );
}
