import { z } from "zod";
import { insertFeeding, listFeedings } from "@/db/queries/feedings";
import { route } from "@/lib/api/route";
import { requireMember } from "@/lib/auth/session";
import { AppError, readJson } from "@/lib/errors";
import { checkMix } from "@/lib/mix";
import { feedingCreate } from "@/lib/validation/logbook";

type Ctx = { params: Promise<{ binId: string }> };

const listQuery = z.object({
  since: z.coerce.date({ message: "since must be a date and time." }).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(50),
});

// GET /api/bins/[binId]/feedings?since=&limit= — a bin's feedings, newest first
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = listQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json({ feedings: await listFeedings(binId, q) });
});

// POST /api/bins/[binId]/feedings — log a feeding; the mix check is computed and kept with it
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "log");
  const input = feedingCreate.parse(await readJson(req));
  const mix = checkMix(input.items.map((i) => ({ name: i.name, massKg: i.massKg, moisturePct: i.moisturePct, carbonPct: i.carbonPct ?? undefined, nitrogenPct: i.nitrogenPct ?? undefined, cn: i.cn ?? undefined })));
  // lib/mix names fields from the items array already ("items.0.cn").
  if (!mix.ok) throw new AppError("invalid", mix.error.message, mix.error.field);
  const feeding = await insertFeeding({
    farmId: who.farmId,
    binId,
    zoneId: input.zoneId ?? null,
    at: input.at ?? new Date(),
    byUserId: who.userId,
    notes: input.notes ?? null,
    mixMoisturePct: mix.value.moisturePct,
    mixCn: mix.value.cn,
    totalKg: mix.value.totalMassKg,
    items: input.items.map((i) => ({
      ingredientId: i.ingredientId ?? null,
      name: i.name,
      massKg: i.massKg,
      moisturePct: i.moisturePct,
      carbonPct: i.carbonPct ?? (i.cn != null && i.nitrogenPct != null ? i.cn * i.nitrogenPct : null),
      nitrogenPct: i.nitrogenPct ?? null,
    })),
  });
  return Response.json({ feeding, mix: mix.value }, { status: 201 });
});
