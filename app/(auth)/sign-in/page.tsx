import { redirect } from "next/navigation";
import { SignInForm } from "@/components/shell/sign-in-form";
import { companies, demoPassword } from "@/db/seed-data";
import { env } from "@/lib/env";
import { getActor } from "@/lib/session";

export const metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string }> }) {
  const { next } = await searchParams;
  if (await getActor()) redirect(next?.startsWith("/") ? next : "/");
  const showDemo = env().ZW_ENV !== "production";
  return (
    <main className="flex min-h-screen items-center justify-center px-4 py-12">
      <div className="w-full max-w-sm">
        <h1 className="text-center text-2xl font-semibold tracking-tight">
          Zone<span className="text-accent-600">wright</span>
        </h1>
        <p className="mt-1 text-center text-sm text-slate-600">Sign in to look after your homes’ audio.</p>
        <SignInForm next={next?.startsWith("/") ? next : "/"} />
        {showDemo ? (
          <details className="mt-6 rounded-md border border-slate-200 bg-white p-3 text-sm">
            <summary className="cursor-pointer font-medium">Demo sign-ins (password “{demoPassword}”)</summary>
            <ul className="mt-2 space-y-1 text-slate-700">
              {companies.flatMap((c) =>
                c.people.map((p) => (
                  <li key={p.email}>
                    <span className="font-mono">{p.email}</span> — {p.role}, {c.name}
                  </li>
                )),
              )}
            </ul>
          </details>
        ) : null}
      </div>
    </main>
  );
}
