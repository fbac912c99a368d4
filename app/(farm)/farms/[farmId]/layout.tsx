import { FarmNav } from "@/components/farm/farm-nav";
import { OfflineBanner } from "@/components/pwa/offline-banner";
import { WaitingEntries } from "@/components/pwa/waiting-entries";
import { requirePageMember } from "@/lib/web/session";

export default async function FarmLayout({ children, params }: { children: React.ReactNode; params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const { role, userId } = await requirePageMember({ farmId }, "read");
  return (
    <>
      {/* When this page was drawn: a copy the phone kept says so when it opens with no signal. */}
      <OfflineBanner renderedAt={new Date().toISOString()} />
      <FarmNav farmId={farmId} role={role} />
      <WaitingEntries userId={userId} farmId={farmId} />
      {children}
    </>
  );
}
