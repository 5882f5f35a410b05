"use client";

export default function AreaError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div role="alert" className="rounded-lg border border-danger-600/30 bg-danger-50 p-6">
      <h2 className="font-semibold text-danger-700">This page could not be shown</h2>
      <p className="mt-1 text-sm text-slate-700">Nothing was changed. {error.digest ? `Reference: ${error.digest}` : null}</p>
      <button onClick={reset} className="mt-4 rounded-md bg-white px-3 py-1.5 text-sm font-medium shadow-sm ring-1 ring-slate-300 hover:bg-slate-50">
        Try again
      </button>
    </div>
  );
}
