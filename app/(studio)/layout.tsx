import Link from "next/link";
import { redirect } from "next/navigation";
import { StudioNav, type NavItem } from "@/components/shell/studio-nav";
import { WhoAmI } from "@/components/shell/who-am-i";
import { env } from "@/lib/env";
import { mayEver } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export default async function StudioLayout({ children }: { children: React.ReactNode }) {
  const actor = await requirePageActor();
  if (actor.role === "homeowner") redirect("/household");
  const items: NavItem[] = [
    { href: "/homes", label: "Homes" },
    ...(mayEver(actor, "library:read") ? [{ href: "/library", label: "Library" }] : []),
    ...(mayEver(actor, "push:read") ? [{ href: "/pushes", label: "Pushes" }] : []),
    ...(mayEver(actor, "device:read") ? [{ href: "/devices", label: "Devices" }] : []),
    ...(mayEver(actor, "audit:read") ? [{ href: "/activity", label: "Activity" }] : []),
    ...(mayEver(actor, "team:read") ? [{ href: "/team", label: "Team" }] : []),
    ...(env().ZW_ENV !== "production" && mayEver(actor, "mailbox:read") ? [{ href: "/mailbox", label: "Mailbox" }] : []),
  ];
  return (
    <div className="min-h-screen">
      <header className="border-b border-slate-200 bg-white">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center justify-between gap-3 px-4 py-3">
          <div className="flex items-center gap-6">
            <Link href="/homes" className="text-lg font-semibold tracking-tight">
              Zone<span className="text-accent-600">wright</span>
            </Link>
            <StudioNav items={items} />
          </div>
          <WhoAmI actor={actor} />
        </div>
      </header>
      <main className="mx-auto max-w-7xl px-4 py-6">{children}</main>
    </div>
  );
}
