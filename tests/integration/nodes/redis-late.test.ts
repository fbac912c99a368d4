// A node started while its Redis is down waits for it, says so in words, and goes on once Redis
// answers (a machine booting, Redis restarting), instead of ending on the first refused connection.
import { afterEach, describe, expect, inject, it, vi } from "vitest";
import { startIngest, type Ingest } from "@/ingest/service";
import { startRedis, stopRedis } from "@/lib/stack/redis-server";
import { freePort } from "../ingest/helpers";

const name = `${inject("clusterName")}-redis-late`;
let ingest: Ingest | null = null;
afterEach(async () => {
  await ingest?.close();
  stopRedis(name);
  vi.restoreAllMocks();
});

describe("an ingest node whose Redis is down at start", () => {
  it("waits, says why, and starts once Redis answers", async () => {
    const port = await freePort();
    const { url } = await startRedis({ name, port });
    stopRedis(name);
    const said: string[] = [];
    vi.spyOn(console, "error").mockImplementation((...args: unknown[]) => void said.push(args.join(" ")));

    let started = false;
    const starting = startIngest({ port: 0, redisUrl: url }).then((i) => {
      started = true;
      return (ingest = i);
    });
    await new Promise((r) => setTimeout(r, 1_500));
    expect(started).toBe(false);
    expect(said.some((l) => l.includes(`Redis at 127.0.0.1:${port} is not answering`) && l.includes("trying again"))).toBe(true);

    await startRedis({ name, port });
    const node = await starting;
    expect(node.port).toBeGreaterThan(0);
    expect(said.at(-1)).toContain("answers; going on");
  }, 30_000);
});
