import { cn } from '@/lib/client/cn';

type Variant = 'primary' | 'secondary' | 'danger' | 'ghost';

const styles: Record<Variant, string> = {
  primary: 'bg-glass-600 text-white hover:bg-glass-700 disabled:bg-ink-300',
  secondary: 'bg-white text-ink-800 ring-1 ring-inset ring-ink-200 hover:bg-ink-50 disabled:text-ink-300',
  danger: 'bg-white text-coral-700 ring-1 ring-inset ring-coral-500/40 hover:bg-coral-50',
  ghost: 'text-ink-600 hover:bg-ink-100 hover:text-ink-900',
};

export function buttonClass(variant: Variant = 'primary', extra?: string): string {
  return cn(
    'inline-flex items-center justify-center gap-1.5 rounded-md px-3 py-1.5 text-sm font-medium transition-colors',
    'focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-glass-500 disabled:cursor-not-allowed',
    styles[variant],
    extra,
  );
}

export function Button({
  variant = 'primary',
  className,
  ...props
}: React.ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant }) {
  return <button type="button" className={buttonClass(variant, className)} {...props} />;
}
