"use client";

export default function RootError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <main className="mx-auto max-w-lg px-6 py-24 text-center" role="alert">
      <h1 className="text-2xl font-semibold">Something went wrong</h1>
      <p className="mt-2 text-slate-600">Nothing was changed. {error.digest ? `Reference: ${error.digest}` : null}</p>
      <button onClick={reset} className="mt-6 rounded-md bg-accent-600 px-4 py-2 text-white hover:bg-accent-700">
        Try again
      </button>
    </main>
  );
}
