import { randomBytes } from "node:crypto";

// 24 random bytes (192 bits) as 32 base64url characters: no "." or ":", so the HTTP bearer
// "<code>.<token>" splits cleanly (lib/web/probe-auth.ts). Only its hash is stored.
export const newProbeToken = () => randomBytes(24).toString("base64url");

export const TOKEN_NOTE = "Copy the token now: it is shown only once.";
