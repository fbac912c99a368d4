import type { z } from "zod";
import { AppError, dataError } from "@/lib/web/errors";

export type ActionState = { ok?: string; error?: string; fieldErrors?: Record<string, string> };

// Every server action: FormData → zod → fn; field errors come back by name, AppErrors as words,
// anything else is logged and reported without internals. Never echoes submitted secrets.
export function validatedAction<S extends z.ZodType>(schema: S, fn: (input: z.infer<S>) => Promise<string>) {
  return async (_prev: ActionState, form: FormData): Promise<ActionState> => {
    const raw = Object.fromEntries([...form.entries()].map(([k, v]) => [k, typeof v === "string" ? v : v.name]));
    const parsed = schema.safeParse(raw);
    if (!parsed.success) {
      const fieldErrors: Record<string, string> = {};
      for (const i of parsed.error.issues) fieldErrors[i.path.join(".") || "form"] ??= i.message;
      return { error: "Check the marked fields.", fieldErrors };
    }
    try {
      return { ok: await fn(parsed.data) };
    } catch (e) {
      const known = e instanceof AppError ? e : dataError(e);
      if (known) return { error: known.message, fieldErrors: known.field ? { [known.field]: known.message } : undefined };
      console.error("[wormward:action]", e);
      return { error: "Something went wrong on our side; nothing was changed." };
    }
  };
}
