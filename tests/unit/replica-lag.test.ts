import { describe, expect, it } from "vitest";
import { heldSince, isReplicaTrouble, lsnBytes, troubleWords } from "@/db/replica";

describe("the replica's lag from WAL positions", () => {
  it("reads a WAL position as bytes, the part before the slash being the high 32 bits", () => {
    expect(lsnBytes("0/3000060")).toBe(0x3000060n);
    expect(lsnBytes("16/B374D848")).toBe((0x16n << 32n) + 0xb374d848n);
    expect(() => lsnBytes("16-B374D848")).toThrow(/not a WAL position/);
  });

  const samples = [
    { at: 1_000, lsn: 100n },
    { at: 2_000, lsn: 100n },
    { at: 3_000, lsn: 250n },
    { at: 4_000, lsn: 400n },
  ];

  it("a replica holds the primary as of the newest sample it has replayed", () => {
    expect(heldSince(samples, 400n)).toBe(4_000);
    expect(heldSince(samples, 399n)).toBe(3_000);
    expect(heldSince(samples, 250n)).toBe(3_000);
  });

  it("an idle primary keeps a caught-up replica fresh: its position did not move", () => {
    expect(heldSince(samples.slice(0, 2), 100n)).toBe(2_000);
  });

  it("a replica behind every sample holds no known moment", () => {
    expect(heldSince(samples, 99n)).toBeNull();
    expect(heldSince([], 500n)).toBeNull();
  });
});

describe("errors of the replica, not of the read", () => {
  const pgError = (code: string) => Object.assign(new Error("x"), { code });

  it("a refused connection, a shutdown, a cancelled query and a timeout are the replica's", () => {
    expect(isReplicaTrouble(pgError("ECONNREFUSED"))).toBe(true);
    expect(isReplicaTrouble(pgError("57P01"))).toBe(true); // admin_shutdown
    expect(isReplicaTrouble(pgError("08006"))).toBe(true); // connection_failure
    expect(isReplicaTrouble(pgError("40001"))).toBe(true); // conflict with recovery
    expect(isReplicaTrouble(pgError("3D000"))).toBe(true); // a database the replica does not have yet
    expect(isReplicaTrouble(new Error("Connection terminated unexpectedly"))).toBe(true);
    expect(isReplicaTrouble(new Error("timeout exceeded when trying to connect"))).toBe(true);
  });

  it("looks through a wrapping error to its cause, as drizzle wraps a failed query", () => {
    expect(isReplicaTrouble(new Error("Failed query: select 1", { cause: pgError("57P03") }))).toBe(true);
  });

  it("a bad query, a refused write and a not-found are not", () => {
    expect(isReplicaTrouble(pgError("42601"))).toBe(false); // syntax_error
    expect(isReplicaTrouble(pgError("25006"))).toBe(false); // read_only_sql_transaction: a write sent to the replica is a bug
    expect(isReplicaTrouble(Object.assign(new Error("Not found."), { code: "not_found" }))).toBe(false);
    expect(isReplicaTrouble("text")).toBe(false);
  });

  it("says a failure in the innermost error's words, without the wrapper's query and parameters", () => {
    const wrapped = new Error("Failed query: select 1 where id = $1\nparams: 7", { cause: pgError("57P01") });
    (wrapped.cause as Error).message = "terminating connection due to administrator command";
    expect(troubleWords(wrapped)).toBe("terminating connection due to administrator command");
  });
});
