import { deleteLogEntry, getLogEntry } from "@/db/queries/logbook";
import { LOG_KINDS, type LogKind } from "@/lib/domain/vocabulary";
import { authorize } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";

const UNDO_WINDOW_MS = 24 * 3600_000;
const isLogKind = (kind: string): kind is LogKind => (LOG_KINDS as readonly string[]).includes(kind);

/** A cheap undo: whoever logged an entry may remove it within 24 hours of logging it; an owner any
 * time. The entry names its bin, so the person is authorized against that bin's farm; an unknown
 * kind or id and another farm's entry all answer 404. */
export async function deleteEntry(userId: string, kind: string, entryId: string) {
  const known = isLogKind(kind) ? kind : null;
  const entry = known && (await getLogEntry(known, entryId));
  if (!known || !entry) throw new AppError("not_found", "Not found.");
  const who = await authorize(userId, { binId: entry.binId }, "log");
  if (who.role !== "owner") {
    if (entry.byUserId !== userId) throw new AppError("forbidden", "Only the person who logged this, or an owner, can remove it.");
    if (Date.now() - entry.createdAt.getTime() > UNDO_WINDOW_MS)
      throw new AppError("forbidden", "Entries can be removed for 24 hours after logging; ask an owner.");
  }
  await deleteLogEntry(known, entryId);
  return { deleted: { kind, id: entryId } };
}
