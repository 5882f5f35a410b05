import { WhoAmI } from "@/components/shell/who-am-i";
import { requirePageActor } from "@/lib/session";

export default async function HouseholdLayout({ children }: { children: React.ReactNode }) {
  const actor = await requirePageActor("/household");
  return (
    <div className="min-h-screen">
      <header className="border-b border-slate-200 bg-white">
        <div className="mx-auto flex max-w-3xl flex-wrap items-center justify-between gap-3 px-4 py-3">
          <span className="text-lg font-semibold tracking-tight">Zone<span className="text-accent-600">wright</span></span>
          <WhoAmI actor={actor} />
        </div>
      </header>
      <main className="mx-auto max-w-3xl px-4 py-6">{children}</main>
    </div>
  );
}
