import type { Metadata } from "next";
import Link from "next/link";
import { AddBinForm } from "@/components/bins/add-bin-form";
import { requirePageMember } from "@/lib/web/session";

export const metadata: Metadata = { title: "Add a bin" };

// Where the setup checklist's "Add a bin" leads: the form alone, open, and back to Today after.
export default async function NewBinPage({ params }: { params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const who = await requirePageMember({ farmId }, "manage");
  return (
    <main className="space-y-3 p-3">
      <p className="px-1 pt-1">
        <Link href={`/farms/${farmId}`} className="inline-flex min-h-11 items-center underline underline-offset-4">
          Back to Today
        </Link>
      </p>
      <AddBinForm farmId={farmId} startOpen heading="h1" thenGoTo={`/farms/${farmId}`} system={who.units} />
    </main>
  );
}
