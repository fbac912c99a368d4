import { describe, expect, it } from "vitest";
import { clientAddress } from "@/lib/server/auth/client-address";
import { BCRYPT_COST, DUMMY_HASH, hashPassword } from "@/lib/server/auth/password";
import { PASSWORD_MAX_BYTES, PASSWORD_TOO_LONG, passwordBytes } from "@/lib/domain/password-rules";
import { tooManyTries } from "@/lib/server/auth/sign-in";
import { newPassword } from "@/lib/domain/validation/team";

describe("the client address", () => {
  it("is not read from X-Forwarded-For when no proxy is trusted: a client can write that header", () => {
    expect(clientAddress("198.51.100.7", 0)).toBeNull();
  });

  it("behind one proxy it is the entry the proxy appended, whatever the client wrote before it", () => {
    expect(clientAddress("198.51.100.7", 1)).toBe("198.51.100.7");
    expect(clientAddress("203.0.113.9, 198.51.100.7", 1)).toBe("198.51.100.7");
    expect(clientAddress("203.0.113.9,198.51.100.7", 1)).toBe("198.51.100.7");
  });

  it("behind two proxies it is the second entry from the right", () => {
    expect(clientAddress("203.0.113.9, 198.51.100.7, 10.0.0.2", 2)).toBe("198.51.100.7");
  });

  it("is unknown when the header is missing, too short for the hops, or not an address", () => {
    expect(clientAddress(undefined, 1)).toBeNull();
    expect(clientAddress("", 1)).toBeNull();
    expect(clientAddress("198.51.100.7", 2)).toBeNull();
    expect(clientAddress("unknown", 1)).toBeNull();
    expect(clientAddress("198.51.100.7:5555", 1)).toBeNull();
  });

  it("an IPv4 client seen through an IPv6 socket is the same address", () => {
    expect(clientAddress("::ffff:127.0.0.1", 1)).toBe("127.0.0.1");
    expect(clientAddress("2001:DB8::1", 1)).toBe("2001:db8::1");
  });
});

describe("passwords for bcrypt", () => {
  it("are counted in UTF-8 bytes, as bcrypt counts them", () => {
    expect(passwordBytes("a".repeat(72))).toBe(72);
    expect(passwordBytes("ü".repeat(36))).toBe(72);
    expect(passwordBytes("🪱")).toBe(4);
  });

  it("a new password over 72 bytes is refused with the message, at 72 it is fine", () => {
    expect(newPassword.safeParse("a".repeat(PASSWORD_MAX_BYTES)).success).toBe(true);
    const r = newPassword.safeParse("ü".repeat(37));
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.message).toBe(PASSWORD_TOO_LONG);
    expect(newPassword.safeParse(`${"🪱".repeat(18)}x`).success).toBe(false);
  });

  it("hashing refuses one over 72 bytes too, whatever door it came through", async () => {
    await expect(hashPassword("x".repeat(73))).rejects.toThrow(PASSWORD_TOO_LONG);
  });

  it("the dummy hash for unknown e-mails has the same cost as real ones", () => {
    expect(DUMMY_HASH).toMatch(new RegExp(`^\\$2[aby]\\$${BCRYPT_COST}\\$[./A-Za-z0-9]{53}$`));
  });
});

describe("the try-again wording", () => {
  const now = new Date("2026-05-01T10:00:00Z");
  it("rounds up to whole minutes", () => {
    expect(tooManyTries(new Date("2026-05-01T10:14:01Z"), now)).toBe("Too many tries. Try again in 15 minutes.");
    expect(tooManyTries(new Date("2026-05-01T10:00:20Z"), now)).toBe("Too many tries. Try again in 1 minute.");
  });
});
