// Loaded into each soak node (`node --expose-gc --import tsx --import ./tests/bench/memory-probe.ts
// ingest/main.ts`, soak.bench.ts) and nowhere else: every SOAK_GC_MS (30 s) one full collection, then
// the process's memory written as a JSON line to SOAK_MEMORY_FILE. The heap left after a full
// collection is what the process still holds; a leak shows there whatever the collector's rhythm or
// V8's choice of heap size does to the resident set.
import fs from "node:fs";

const file = process.env.SOAK_MEMORY_FILE;
const every = Number(process.env.SOAK_GC_MS ?? 30_000);
const gc = (globalThis as { gc?: () => void }).gc;
if (file && gc) {
  setInterval(() => {
    gc();
    const m = process.memoryUsage();
    fs.appendFileSync(file, `${JSON.stringify({ t: Date.now(), rss: m.rss, heapUsed: m.heapUsed, heapTotal: m.heapTotal, external: m.external })}\n`);
  }, every).unref();
}
