"use client";
import Link from "next/link";
import { usePathname } from "next/navigation";

const tabs = [
  { href: "/library/curves", label: "Tone curves" },
  { href: "/library/templates", label: "Zone templates" },
];

export function LibraryTabs() {
  const pathname = usePathname();
  return (
    <nav aria-label="Library" className="flex gap-2 border-b border-slate-200">
      {tabs.map((t) => (
        <Link
          key={t.href}
          href={t.href}
          aria-current={pathname.startsWith(t.href) ? "page" : undefined}
          className={`-mb-px border-b-2 px-3 py-2 text-sm font-medium ${
            pathname.startsWith(t.href) ? "border-accent-600 text-accent-700" : "border-transparent text-slate-600 hover:text-slate-900"
          }`}
        >
          {t.label}
        </Link>
      ))}
    </nav>
  );
}
