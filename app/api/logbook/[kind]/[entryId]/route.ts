import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { deleteEntry } from "@/lib/server/logbook/delete-entry";

type Ctx = { params: Promise<{ kind: string; entryId: string }> };

// DELETE /api/logbook/[kind]/[entryId] — a cheap undo: the author within 24 h of logging; owners any time.
// The entry's bin is known only once it is read, so the use case authorizes against that bin's farm.
export const DELETE = route(async (_req, { params }: Ctx) => {
  const { kind, entryId } = await params;
  const userId = await requireUser();
  return Response.json(await deleteEntry(userId, kind, entryId));
});
