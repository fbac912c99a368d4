// Whether reads may go to the streaming replica (DATABASE_REPLICA_URL) now: only while it is known
// to hold everything the primary held REPLICA_MAX_LAG_MS ago. Its lag is measured on the WAL
// positions of both servers, so an idle primary is not mistaken for a lagging replica (as
// now() - pg_last_xact_replay_timestamp() would be) and a replica whose WAL receiver stopped is not
// mistaken for a caught-up one (as receive LSN = replay LSN would be).
import createDebug from "debug";
import type pg from "pg";

const log = createDebug("wormward:replica");

export type LsnSample = { at: number; lsn: bigint };

/** A WAL position as PostgreSQL writes it ("16/B374D848") in bytes. */
export function lsnBytes(lsn: string): bigint {
  const m = /^([0-9A-F]{1,8})\/([0-9A-F]{1,8})$/i.exec(lsn);
  if (!m) throw new Error(`not a WAL position: ${lsn}`);
  return (BigInt(`0x${m[1]}`) << 32n) + BigInt(`0x${m[2]}`);
}

/** The newest moment of the primary the replica is known to hold: the time of the newest sample of
 * the primary's WAL position (oldest first, each taken before the replay position was read) that
 * the replica has replayed; null when it has replayed none of them. */
export function heldSince(samples: readonly LsnSample[], replayed: bigint): number | null {
  for (let i = samples.length - 1; i >= 0; i--) if (samples[i]!.lsn <= replayed) return samples[i]!.at;
  return null;
}

// Errors of the replica rather than of the read: no connection, a server shutting down or out of
// resources, a login or a database it does not have (yet), a query cancelled by the standby's
// replay (SQLSTATE classes 08, 28, 53, 57, 58, 3D000 and 40001, PostgreSQL docs Appendix A), and the
// pool's own connect and read timeouts.
const NET_CODES = /^(ECONNREFUSED|ECONNRESET|ETIMEDOUT|EPIPE|EHOSTUNREACH|ENETUNREACH)$/;
export function isReplicaTrouble(err: unknown): boolean {
  for (let e = err; e instanceof Error; e = e.cause) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === "string" && (NET_CODES.test(code) || /^(08|28|53|57|58)[0-9A-Z]{3}$/.test(code) || code === "3D000" || code === "40001")) return true;
    if (/^(Connection terminated|timeout exceeded when trying to connect|Query read timeout)/.test(e.message)) return true;
  }
  return false;
}

// A check gives up on a server that does not answer in 2 s (node-postgres reads query_timeout from
// a query's config as well as the pool's, though its types name only the pool's).
const timed = (text: string) => ({ text, query_timeout: 2_000 }) as pg.QueryConfig;

/** What went wrong, in the innermost error's words: drizzle's wrapper repeats the query and its parameters. */
export function troubleWords(err: unknown): string {
  let e = err;
  while (e instanceof Error && e.cause instanceof Error) e = e.cause;
  return e instanceof Error ? e.message : String(e);
}

export type ReplicaStatus = { usable: boolean; lagMs: number | null; problem: string | null };

export class ReplicaGuard {
  private samples: LsnSample[] = [];
  private held: number | null = null;
  private checkedAt = 0;
  private checking: Promise<void> | null = null;
  private problem: string | null = "not checked yet";
  private wasUsable = false;

  constructor(
    private readonly primary: pg.Pool,
    private readonly replica: pg.Pool,
    private readonly opts: { maxLagMs: number; checkMs: number },
  ) {}

  /** Whether reads may go to the replica now. Starts a check when one is due; no read waits for it,
   * so the first read after a quiet spell may go to the primary. */
  usable(now = Date.now()): boolean {
    if (!this.checking && now - this.checkedAt >= this.opts.checkMs) this.checking = this.check().finally(() => (this.checking = null));
    const ok = this.held !== null && now - this.held <= this.opts.maxLagMs;
    if (ok !== this.wasUsable) log(ok ? "reads go to the replica (%d ms behind)" : "reads go to the primary: %s", ok ? now - this.held! : this.describe(now));
    this.wasUsable = ok;
    return ok;
  }

  /** A read on the replica failed for the replica's sake: the primary until a check finds it back. */
  failed(err: unknown) {
    this.held = null;
    this.problem = troubleWords(err);
    this.checkedAt = Date.now();
  }

  status(now = Date.now()): ReplicaStatus {
    return { usable: this.held !== null && now - this.held <= this.opts.maxLagMs, lagMs: this.held === null ? null : now - this.held, problem: this.problem };
  }

  /** Samples the primary's WAL position, then reads how far the replica has replayed. */
  async check(): Promise<void> {
    const at = Date.now();
    try {
      const p = await this.primary.query<{ lsn: string }>(timed("select pg_current_wal_lsn()::text as lsn"));
      this.samples.push({ at, lsn: lsnBytes(p.rows[0]!.lsn) });
      // Older samples cannot make the replica usable again: one that old is past the bound.
      const keepFrom = at - this.opts.maxLagMs - 2 * this.opts.checkMs;
      this.samples = this.samples.filter((s, i) => s.at >= keepFrom || i === this.samples.length - 1);
      const r = await this.replica.query<{ standby: boolean; lsn: string | null }>(
        timed("select pg_is_in_recovery() as standby, pg_last_wal_replay_lsn()::text as lsn"),
      );
      const row = r.rows[0]!;
      // A promoted replica follows the primary no more, however fresh it was.
      if (!row.standby || !row.lsn) {
        this.held = null;
        this.problem = "the replica is not a standby";
      } else {
        const since = heldSince(this.samples, lsnBytes(row.lsn));
        if (since !== null) this.held = Math.max(since, this.held ?? since);
        this.problem = null;
      }
    } catch (err) {
      this.held = null;
      this.problem = troubleWords(err);
    } finally {
      this.checkedAt = Date.now();
    }
  }

  private describe(now: number): string {
    if (this.problem) return this.problem;
    return this.held === null ? "its lag is not known yet" : `${now - this.held} ms behind (at most ${this.opts.maxLagMs})`;
  }
}
