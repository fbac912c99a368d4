import { createHash, randomBytes } from "node:crypto";

// Invitation and reset links carry 256 random bits; only their sha256 is stored, so a copy of
// the database cannot be turned into working links.
export const newLinkToken = () => randomBytes(32).toString("base64url");
export const hashLinkToken = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");
