import { env } from "@/lib/server/env";
import { AppError } from "@/lib/domain/errors";

/** The VAPID public key (RFC 8292) a browser subscribes with: the Push API's applicationServerKey. */
export function pushPublicKey() {
  const key = env().VAPID_PUBLIC_KEY;
  if (!key) throw new AppError("not_found", "Push is not set up on this server.");
  return { publicKey: key };
}
