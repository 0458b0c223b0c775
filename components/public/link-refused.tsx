import Link from 'next/link';

export function LinkRefused({
  message,
  retryHref,
  retryLabel,
}: {
  message: string;
  retryHref: string;
  retryLabel: string;
}) {
  return (
    <div role="alert" className="rounded-md border border-amber-300 bg-amber-50 px-4 py-4 text-sm">
      <p className="font-semibold text-amber-700">This link cannot be used</p>
      <p className="mt-1 text-ink-800">{message}</p>
      <Link href={retryHref} className="mt-3 inline-block font-medium text-glass-700 underline">
        {retryLabel}
      </Link>
    </div>
  );
}
