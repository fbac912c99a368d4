// Pure rules for a new password, shared by the forms' zod schema and the hashing itself.

// bcrypt reads only the first 72 bytes of a password (UTF-8 bytes, not characters) and ignores the
// rest, so a longer one would not be the password the person thinks they set.
export const PASSWORD_MAX_BYTES = 72;
export const PASSWORD_TOO_LONG = `Use at most ${PASSWORD_MAX_BYTES} bytes: about ${PASSWORD_MAX_BYTES} plain letters, fewer with accents or emoji.`;

export const passwordBytes = (plain: string) => new TextEncoder().encode(plain).length;
