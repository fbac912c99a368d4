// The backstop behind the schemas: a value that still reaches PostgreSQL and is refused there as a
// data exception (SQLSTATE class 22) becomes a 422 in plain words, not a logged 500 with internals.
// Real PostgreSQL (the worker's database), real drizzle queries, the app's own error mapping.
import { eq, sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db";
import { bins, farms, waterings } from "@/db/schema";
import { errorBody } from "@/lib/web/errors";
import { validatedAction } from "@/lib/web/validated-action";
import { z } from "zod";

afterAll(async () => {
  await closeDb();
});

async function refusal(run: () => Promise<unknown>) {
  try {
    await run();
  } catch (err) {
    return err;
  }
  throw new Error("PostgreSQL stored what it should have refused");
}

async function aFarm() {
  const [f] = await db().insert(farms).values({ name: "Zz data errors" }).returning();
  return f!;
}

describe("PostgreSQL data errors", () => {
  it("a NUL byte that reaches a text column is a 422 that names no internals", async () => {
    const err = await refusal(() => db().insert(farms).values({ name: "Bin\u0000A" }));
    const { status, body } = errorBody(err);
    expect(status).toBe(422);
    expect(body.error).toEqual({ code: "invalid", message: expect.stringMatching(/character that cannot be stored/), field: undefined });
    expect(JSON.stringify(body)).not.toMatch(/insert into|byte sequence|0x00/i);
  });

  it("a NUL byte that reaches a jsonb column is a 422", async () => {
    // JSON's \u0000 escape, which jsonb refuses (22P05), as an import report or an alert detail would carry it.
    const err = await refusal(() => db().execute(sql`select ${JSON.stringify({ reason: "bad\u0000cell" })}::jsonb`));
    expect(errorBody(err).status).toBe(422);
  });

  it("5e-324 in a real column is a 422", async () => {
    const f = await aFarm();
    try {
      const err = await refusal(() => db().insert(bins).values({ farmId: f.id, name: "tiny", style: "tote", species: "eisenia-fetida", lengthCm: 5e-324 }));
      const { status, body } = errorBody(err);
      expect(status).toBe(422);
      expect(body.error.message).toMatch(/too large or too small/);
    } finally {
      await db().delete(farms).where(eq(farms.id, f.id));
    }
  });

  it("a date beyond PostgreSQL's range is a 422", async () => {
    const f = await aFarm();
    try {
      const [b] = await db().insert(bins).values({ farmId: f.id, name: "b", style: "tote", species: "eisenia-fetida" }).returning();
      // JavaScript's last day is written "+275760-09-13T…Z"; PostgreSQL does not read a six-digit
      // year with a sign (22009), though its own range reaches 294276 AD.
      const err = await refusal(() =>
        db()
          .insert(waterings)
          .values({ farmId: f.id, binId: b!.id, litres: 1, at: new Date(8.64e15) }),
      );
      expect(errorBody(err).status).toBe(422);
    } finally {
      await db().delete(farms).where(eq(farms.id, f.id));
    }
  });

  it("a server action whose query is refused this way answers in words, not 'something went wrong'", async () => {
    const action = validatedAction(z.object({ name: z.string() }), async ({ name }) => {
      await db().insert(farms).values({ name });
      return "saved";
    });
    const form = new FormData();
    form.set("name", "Bin\u0000A");
    const out = await action({}, form);
    expect(out.ok).toBeUndefined();
    expect(out.error).toMatch(/character that cannot be stored/);
  });

  it("an error that is not a data error is still a 500 that says nothing internal", () => {
    const { status, body } = errorBody(Object.assign(new Error("connection refused"), { code: "ECONNREFUSED" }));
    expect(status).toBe(500);
    expect(body.error.message).toBe("Something went wrong on our side.");
  });
});
