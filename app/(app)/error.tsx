'use client';

export default function AppError({ reset }: { error: Error; reset: () => void }) {
  return (
    <div role="alert" className="rounded-card border border-coral-500/30 bg-coral-50 px-6 py-6">
      <h2 className="text-base font-semibold text-coral-700">This page could not be shown</h2>
      <p className="mt-1 text-sm text-ink-700">
        Something went wrong on the server. The detail has been logged for your admin.
      </p>
      <button
        type="button"
        onClick={reset}
        className="mt-3 rounded-md bg-white px-3 py-1.5 text-sm font-medium ring-1 ring-ink-200 hover:bg-ink-50"
      >
        Try again
      </button>
    </div>
  );
}
