"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";

// The farm's own pages; the current one is marked by weight and an underline, not colour alone.
export function FarmNav({ farmId, role }: { farmId: string; role: string }) {
  const path = usePathname();
  const base = `/farms/${farmId}`;
  const links = [
    { href: base, label: "Today" },
    { href: `${base}/alerts`, label: "Alerts" },
    { href: `${base}/logbook`, label: "Logbook" },
    { href: `${base}/probes`, label: "Probes" },
    ...(role === "owner" ? [{ href: `${base}/imports`, label: "Import" }] : []),
    { href: `${base}/team`, label: "Team" },
    ...(role === "owner" ? [{ href: `${base}/settings`, label: "Settings" }] : []),
  ];
  return (
    <nav aria-label="Farm" className="flex gap-1 overflow-x-auto border-b border-soil-300 bg-soil-100 px-2">
      {links.map((l) => {
        // An alert's own page sits under the history.
        const current = path === l.href || (l.label === "Alerts" && path.startsWith(`${l.href}/`));
        return (
          <Link
            key={l.href}
            href={l.href}
            aria-current={current ? "page" : undefined}
            className={`flex min-h-12 items-center px-3 ${current ? "border-b-4 border-soil-800 font-bold" : "text-soil-700"}`}
          >
            {l.label}
          </Link>
        );
      })}
    </nav>
  );
}
