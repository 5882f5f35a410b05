import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-lg px-6 py-24 text-center">
      <p className="text-sm font-semibold text-accent-700">404</p>
      <h1 className="mt-2 text-2xl font-semibold">Nothing here</h1>
      <p className="mt-2 text-slate-600">This page does not exist, or it is not yours to see.</p>
      <Link href="/" className="mt-6 inline-block rounded-md bg-accent-600 px-4 py-2 text-white hover:bg-accent-700">
        Back to start
      </Link>
    </main>
  );
}
