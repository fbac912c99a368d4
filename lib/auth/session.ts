import { getServerSession } from "next-auth";
import { notFound } from "next/navigation";
import type { Target } from "@/db/queries/access";
import { AppError } from "@/lib/errors";
import { authorize, type Who } from "./authorize";
import { authOptions } from "./options";
import type { Permission } from "./roles";

export async function currentUserId(): Promise<string | null> {
  const session = await getServerSession(authOptions);
  const id = (session?.user as { id?: string } | undefined)?.id;
  return id ?? null;
}

export async function requireUser(): Promise<string> {
  const id = await currentUserId();
  if (!id) throw new AppError("unauthenticated", "Sign in first.");
  return id;
}

export async function requireMember(target: Target, may: Permission): Promise<Who> {
  return authorize(await currentUserId(), target, may);
}

// For pages: a refusal of any kind shows the not-found page, so another farm's ids reveal nothing.
export async function requirePageMember(target: Target, may: Permission): Promise<Who> {
  try {
    return await requireMember(target, may);
  } catch (e) {
    if (e instanceof AppError) notFound();
    throw e;
  }
}
