import { cn } from '@/lib/client/cn';

export const inputClass =
  'block w-full rounded-md border border-ink-200 bg-white px-3 py-2 text-sm text-ink-900 shadow-xs placeholder:text-ink-300 focus:border-glass-500 focus:outline-2 focus:outline-glass-500/30 aria-[invalid=true]:border-coral-500 disabled:cursor-not-allowed disabled:bg-ink-50';

/** A labelled input; errors are tied to it with aria-describedby. */
export function Field({
  id,
  label,
  error,
  hint,
  className,
  ...input
}: React.ComponentProps<'input'> & { id: string; label: string; error?: string; hint?: string }) {
  const describedBy = [error ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(' ') || undefined;
  return (
    <div className={className}>
      <label htmlFor={id} className="block text-sm font-medium text-ink-800">
        {label}
      </label>
      <input
        id={id}
        name={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={cn(inputClass, 'mt-1')}
        {...input}
      />
      {hint ? (
        <p id={`${id}-hint`} className="mt-1 text-xs text-ink-500">
          {hint}
        </p>
      ) : null}
      <FieldError id={id} error={error} />
    </div>
  );
}

/** The error under an input, with the id its aria-describedby points at (`${id}-error`); nothing when there is no error. */
export function FieldError({ id, error }: { id: string; error?: string }) {
  return error ? (
    <p id={`${id}-error`} className="mt-1 text-xs font-medium text-coral-600">
      {error}
    </p>
  ) : null;
}

export function FormMessage({ tone, children }: { tone: 'error' | 'ok' | 'warn'; children: React.ReactNode }) {
  const cls =
    tone === 'error'
      ? 'border-coral-500/40 bg-coral-50 text-coral-700'
      : tone === 'warn'
        ? 'border-amber-300 bg-amber-50 text-amber-700'
        : 'border-glass-200 bg-glass-50 text-glass-800';
  return (
    <p role={tone === 'ok' ? 'status' : 'alert'} className={cn('rounded-md border px-3 py-2 text-sm', cls)}>
      {children}
    </p>
  );
}
