import { createHash, randomBytes } from "node:crypto";

// Probe tokens and invitation and reset links carry at least 144 random bits; only their sha256 is
// stored, so a copy of the database cannot be turned into working credentials.
export const newLinkToken = () => randomBytes(32).toString("base64url");
export const hashToken = (token: string) => createHash("sha256").update(token, "utf8").digest("hex");
