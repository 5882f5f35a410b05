import Link from "next/link";

export default function AuthNotFound() {
  return (
    <div className="py-24 text-center">
      <p>Nothing here.</p>
      <Link href="/sign-in" className="text-accent-700 underline">Sign in</Link>
    </div>
  );
}
