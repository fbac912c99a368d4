import { describe, expect, it } from "vitest";
import { safeNext } from "@/lib/domain/safe-next";

const ORIGIN = "http://127.0.0.1:3000";

describe("after sign-in, only our own pages", () => {
  // The values as the sign-in page receives them, already percent-decoded from `?next=`.
  const away: [string, string][] = [
    ["/\\evil.example", "next=/%5Cevil.example: a browser reads the backslash as a slash"],
    ["/\t/evil.example", "next=/%09/evil.example: a browser drops the tab"],
    ["/\n/evil.example", "a newline is dropped as well"],
    ["//evil.example", "a protocol-relative address"],
    ["\\\\evil.example", "two backslashes"],
    ["https://evil.example", "an absolute address elsewhere"],
    ["https://127.0.0.1:3000.evil.example/", "our host as a prefix of another"],
    ["http://127.0.0.1:3001/", "our host on another port"],
    ["javascript:alert(document.cookie)", "a script address"],
    ["JaVaScRiPt:alert(1)", "a script address in mixed case"],
    ["data:text/html,<script>alert(1)</script>", "a data address"],
    [" //evil.example", "leading space before //"],
  ];
  for (const [next, why] of away) {
    it(`${JSON.stringify(next)} lands on Today (${why})`, () => {
      expect(safeNext(next, ORIGIN)).toBe("/");
    });
  }

  it("no next, or an empty one, lands on Today", () => {
    expect(safeNext(undefined, ORIGIN)).toBe("/");
    expect(safeNext(null, ORIGIN)).toBe("/");
    expect(safeNext("", ORIGIN)).toBe("/");
  });

  it("a path of ours is kept with its query and fragment", () => {
    expect(safeNext("/farms/8c1d/bins?zone=fresh#chart", ORIGIN)).toBe("/farms/8c1d/bins?zone=fresh#chart");
    expect(safeNext("/join/abc", ORIGIN)).toBe("/join/abc");
  });

  it("our own absolute address becomes its path", () => {
    expect(safeNext("http://127.0.0.1:3000/me", ORIGIN)).toBe("/me");
  });

  it("what is returned is the resolved path, which a browser cannot read as another site", () => {
    // Dot segments are resolved; an encoded backslash stays encoded inside our path.
    expect(safeNext("/a/../../me", ORIGIN)).toBe("/me");
    expect(safeNext("/%5Cevil.example", ORIGIN)).toBe("/%5Cevil.example");
    // These resolve to our origin with a path starting "//", which read again is another site.
    for (const next of ["/./\\evil.example", "/.//evil.example", "/%2e/\\evil.example", "/x/..//evil.example"]) {
      expect(safeNext(next, ORIGIN), next).toBe("/");
    }
  });
});
