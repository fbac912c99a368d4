"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useEffect } from "react";

type FarmChoice = { id: string; name: string; role: string };

// The farm in the address is remembered (a cookie, a year), so "/" opens it next time
// (lib/server/farms/landing-farm.ts). Several farms: a menu to go to another.
export function FarmSwitcher({ farms, cookie }: { farms: FarmChoice[]; cookie: string }) {
  const path = usePathname();
  const current = farms.find((f) => path === `/farms/${f.id}` || path.startsWith(`/farms/${f.id}/`));
  useEffect(() => {
    if (current) document.cookie = `${cookie}=${current.id}; path=/; max-age=31536000; samesite=lax`;
  }, [current, cookie]);
  const others = farms.filter((f) => f !== current);
  return (
    <details className="relative min-w-0">
      {/* Its name is its text (WCAG 2.5.3, label in name): "Farm: Alder Row", the first word for screen readers. */}
      <summary className="flex min-h-11 max-w-32 min-w-0 cursor-pointer items-center rounded-lg px-2">
        {current ? (
          <>
            <span className="sr-only">Farm: </span>
            <span className="truncate">{current.name}</span>
          </>
        ) : (
          "Farms"
        )}
      </summary>
      <div className="absolute left-0 z-20 mt-1 w-64 space-y-1 rounded-xl bg-white p-2 text-soil-900 shadow-lg ring-1 ring-soil-300">
        {others.length > 0 && <p className="px-2 text-sm text-soil-700">Go to another farm</p>}
        {others.map((f) => (
          <Link key={f.id} href={`/farms/${f.id}`} className="flex min-h-11 items-center rounded-lg px-2 font-bold hover:bg-soil-100">
            {f.name} <span className="ml-2 text-sm font-normal text-soil-700">{f.role}</span>
          </Link>
        ))}
        <Link href="/farms/new" className="flex min-h-11 items-center rounded-lg px-2 hover:bg-soil-100">
          Start a farm
        </Link>
        <Link href="/me/farms" className="flex min-h-11 items-center rounded-lg px-2 hover:bg-soil-100">
          Your farms: leave or delete
        </Link>
        <Link href="/me/data" className="flex min-h-11 items-center rounded-lg px-2 hover:bg-soil-100">
          Your data: download or delete
        </Link>
      </div>
    </details>
  );
}
