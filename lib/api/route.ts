import { errorResponse } from "@/lib/errors";

// Wraps a route handler so every thrown AppError, ZodError or surprise becomes the one error envelope.
export function route<C>(fn: (req: Request, ctx: C) => Promise<Response>) {
  return async (req: Request, ctx: C): Promise<Response> => {
    try {
      return await fn(req, ctx);
    } catch (err) {
      return errorResponse(err);
    }
  };
}
