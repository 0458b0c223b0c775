import Link from 'next/link';

/** Shown instead of a page when the signed-in role may not use it. */
export function Refusal({ message, hint }: { message: string; hint?: string }) {
  return (
    <div role="alert" className="rounded-card border border-amber-300 bg-amber-50 px-6 py-6">
      <h2 className="text-base font-semibold text-amber-700">Not available to your role</h2>
      <p className="mt-1 text-sm text-ink-800">{message}</p>
      <p className="mt-2 text-sm text-ink-600">
        {hint ?? 'A team admin can change your role on the Team page if you need this.'}{' '}
        <Link href="/" className="font-medium text-glass-700 underline underline-offset-2">
          Back to the overview
        </Link>
      </p>
    </div>
  );
}
