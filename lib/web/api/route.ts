import { AppError, errorResponse } from "@/lib/web/errors";
import { appOrigins, isCrossSiteChange } from "./same-origin";

// Wraps a route handler so every thrown AppError, ZodError or surprise becomes the one error
// envelope, and no handler acts on a change sent from another site's page.
export function route<C>(fn: (req: Request, ctx: C) => Promise<Response>) {
  return async (req: Request, ctx: C): Promise<Response> => {
    try {
      if (isCrossSiteChange(req, appOrigins())) {
        throw new AppError("forbidden", "Changes are accepted only from Wormward's own pages; this request came from another site.");
      }
      return await fn(req, ctx);
    } catch (err) {
      return errorResponse(err);
    }
  };
}
