import Link from "next/link";

export default function AreaNotFound() {
  return (
    <div className="py-16 text-center">
      <h2 className="text-xl font-semibold">Not found</h2>
      <p className="mt-1 text-slate-600">It does not exist, or it is not yours to see.</p>
      <Link href="/" className="mt-4 inline-block text-accent-700 underline">Back to start</Link>
    </div>
  );
}
