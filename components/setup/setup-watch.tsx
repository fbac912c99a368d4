"use client";

import { useRouter } from "next/navigation";
import { useEffect, useRef } from "react";
import { useToday } from "@/lib/client/hooks/use-today";

/** Ticks the server-drawn checklist without a reload: when Today's own polling shows a bin or a
 * reading that the checklist has not ticked yet, the page is drawn again once. */
export function SetupWatch({ farmId, binDone, readingDone }: { farmId: string; binDone: boolean; readingDone: boolean }) {
  const router = useRouter();
  const { data } = useToday(farmId);
  const asked = useRef(new Set<string>());
  useEffect(() => {
    if (!data) return;
    const zones = data.bins.flatMap((b) => b.zones);
    const seen = { bin: data.bins.length > 0, reading: zones.some((z) => Object.keys(z.latest).length > 0) };
    const news = (seen.bin && !binDone ? "bin" : "") + (seen.reading && !readingDone ? "reading" : "");
    if (!news || asked.current.has(news)) return;
    asked.current.add(news);
    router.refresh();
  }, [data, binDone, readingDone, router]);
  return null;
}
