// What a probe posts to /api/ingest: SenML JSON (RFC 8428 §6), read with the MQTT payload cap, so
// a large body is refused without being held.
import { DEFAULT_LIMITS } from "@/lib/domain/telemetry";
import type { PostedMessage } from "@/lib/server/ingest/http-ingest";
import { AppError } from "@/lib/web/errors";
import { capWords, mediaType, readCappedBody } from "./body";

export const SENML_JSON = "application/senml+json";

function requireSenmlJson(headers: Headers): void {
  const type = mediaType(headers.get("content-type"));
  if (type !== SENML_JSON) {
    throw new AppError("unsupported_media", `Send SenML JSON with Content-Type: ${SENML_JSON} (RFC 8428 §6)${type ? `, not ${type}` : ""}.`);
  }
  const coding = (headers.get("content-encoding") ?? "identity").trim().toLowerCase();
  if (coding !== "identity") throw new AppError("unsupported_media", `Content-Encoding ${coding} is not accepted; send the body as it is.`);
}

/** The posted message, or the words for one over the cap (which the ingest records before it refuses it). */
export async function readSenmlBody(req: Request, max = DEFAULT_LIMITS.maxBytes): Promise<PostedMessage> {
  requireSenmlJson(req.headers);
  const body = await readCappedBody(req, max);
  return body.ok ? { bytes: body.bytes } : { tooLarge: `The body is ${body.size}; at most ${capWords(max)} are accepted.` };
}
