import { deleteLogEntry, getLogEntry, LOG_KINDS, type LogKind } from "@/db/queries/logbook";
import { route } from "@/lib/web/api/route";
import { authorize } from "@/lib/server/auth/authorize";
import { requireUser } from "@/lib/web/session";
import { AppError } from "@/lib/domain/errors";

type Ctx = { params: Promise<{ kind: string; entryId: string }> };
const UNDO_WINDOW_MS = 24 * 3600_000;

// DELETE /api/logbook/[kind]/[entryId] — a cheap undo: the author within 24 h of logging; owners any time
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { kind, entryId } = await params;
  const userId = await requireUser();
  const entry = LOG_KINDS.includes(kind as LogKind) ? await getLogEntry(kind as LogKind, entryId) : null;
  if (!entry) throw new AppError("not_found", "Not found.");
  const who = await authorize(userId, { binId: entry.binId }, "log");
  if (who.role !== "owner") {
    if (entry.byUserId !== userId) throw new AppError("forbidden", "Only the person who logged this, or an owner, can remove it.");
    if (Date.now() - entry.createdAt.getTime() > UNDO_WINDOW_MS)
      throw new AppError("forbidden", "Entries can be removed for 24 hours after logging; ask an owner.");
  }
  await deleteLogEntry(kind as LogKind, entryId);
  return Response.json({ deleted: { kind, id: entryId } });
});
