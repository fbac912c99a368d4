import { z } from "zod";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";

type Ctx = { params: Promise<{ binId: string }> };
type Common = { zoneId?: string | null; at?: Date; notes?: string | null };
export type LogEntryRow<T> = Omit<T, keyof Common> & { farmId: string; binId: string; zoneId: string | null; at: Date; byUserId: string; notes: string | null };

const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(50) });

// GET (members read, newest first) and POST (keepers and owners log one) for a kind of bin
// logbook entry; the route files differ only in schema, query and the answer's names.
export function logEntryRoutes<S extends z.ZodType<Common>, R>(o: {
  schema: S;
  insert: (row: LogEntryRow<z.infer<S>>) => Promise<R>;
  list: (binId: string, q: { limit: number }) => Promise<unknown[]>;
  many: string;
  one: string;
}) {
  const GET = route(async (req, { params }: Ctx) => {
    const { binId } = await params;
    await requireMember({ binId }, "read");
    const q = listQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
    return Response.json({ [o.many]: await o.list(binId, q) });
  });
  const POST = route(async (req, { params }: Ctx) => {
    const { binId } = await params;
    const who = await requireMember({ binId }, "log");
    const { zoneId, at, notes, ...rest } = o.schema.parse(await readJson(req));
    const row = { ...rest, farmId: who.farmId, binId, zoneId: zoneId ?? null, at: at ?? new Date(), byUserId: who.userId, notes: notes ?? null } as LogEntryRow<
      z.infer<S>
    >;
    return Response.json({ [o.one]: await o.insert(row) }, { status: 201 });
  });
  return { GET, POST };
}
