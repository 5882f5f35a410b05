import Link from "next/link";

export const metadata = { title: "Not allowed" };

export default function ForbiddenPage() {
  return (
    <main className="mx-auto max-w-lg px-6 py-24 text-center" data-testid="forbidden">
      <p className="text-sm font-semibold text-danger-700">403</p>
      <h1 className="mt-2 text-2xl font-semibold">Your role does not allow this</h1>
      <p className="mt-2 text-slate-600">Ask the owner of your company if you need access.</p>
      <Link href="/" className="mt-6 inline-block rounded-md bg-accent-600 px-4 py-2 text-white hover:bg-accent-700">
        Back to start
      </Link>
    </main>
  );
}
