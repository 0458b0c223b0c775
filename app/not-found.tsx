import Link from 'next/link';

export default function NotFound() {
  return (
    <main className="mx-auto max-w-lg px-6 py-24 text-center">
      <p className="font-mono text-sm text-glass-700">404</p>
      <h1 className="mt-2 text-2xl font-semibold">Nothing at this bearing</h1>
      <p className="mt-2 text-sm text-ink-600">The page does not exist, or it belongs to another team.</p>
      <Link href="/" className="mt-6 inline-block text-sm font-medium text-glass-700 underline">
        Back to the overview
      </Link>
    </main>
  );
}
