import { notFound } from "next/navigation";
import { FarmNav } from "@/components/farm/farm-nav";
import { requireMember } from "@/lib/auth/session";
import { AppError } from "@/lib/errors";

export default async function FarmLayout({ children, params }: { children: React.ReactNode; params: Promise<{ farmId: string }> }) {
  const { farmId } = await params;
  let role: string;
  try {
    role = (await requireMember({ farmId }, "read")).role;
  } catch (e) {
    if (e instanceof AppError) notFound();
    throw e;
  }
  return (
    <>
      <FarmNav farmId={farmId} role={role} />
      {children}
    </>
  );
}
