import { FarmNav } from "@/components/farm/farm-nav";
import { requirePageMember } from "@/lib/web/session";

export default async function FarmLayout({ children, params }: { children: React.ReactNode; params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  const { role } = await requirePageMember({ farmId }, "read");
  return (
    <>
      <FarmNav farmId={farmId} role={role} />
      {children}
    </>
  );
}
