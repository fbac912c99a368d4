import bcrypt from "bcryptjs";

// bcrypt cost 10: about 60 ms here, a fair trade for a sign-in form.
export const hashPassword = (plain: string) => bcrypt.hash(plain, 10);
export const verifyPassword = (plain: string, hash: string) => bcrypt.compare(plain, hash);
