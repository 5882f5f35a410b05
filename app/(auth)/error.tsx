"use client";

export default function AuthError({ reset }: { error: Error; reset: () => void }) {
  return (
    <div role="alert" className="mx-auto max-w-sm py-24 text-center">
      <p className="font-semibold">Sign-in is unavailable right now.</p>
      <button onClick={reset} className="mt-4 rounded-md bg-accent-600 px-3 py-1.5 text-white">Try again</button>
    </div>
  );
}
