import { cn } from '@/lib/client/cn';

const tones = {
  teal: 'bg-glass-50 text-glass-800 ring-glass-200',
  ink: 'bg-ink-50 text-ink-700 ring-ink-200',
  amber: 'bg-amber-50 text-amber-700 ring-amber-200',
  coral: 'bg-coral-50 text-coral-700 ring-coral-100',
} as const;

export function Badge({ tone = 'ink', children }: { tone?: keyof typeof tones; children: React.ReactNode }) {
  return (
    <span
      className={cn(
        'inline-flex items-center rounded px-1.5 py-0.5 text-2xs font-medium ring-1 ring-inset',
        tones[tone],
      )}
    >
      {children}
    </span>
  );
}

export const roleTone = { admin: 'teal', engineer: 'ink', reviewer: 'amber', viewer: 'ink' } as const;
