// CSV import for offline loggers through the real app: POST /api/farms/[farmId]/imports (multipart).
import { createHash } from "node:crypto";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { signIn, type Session } from "../../helpers/app";
import { addMember, makeFarm, type TestFarm } from "../series/fixtures";

type Outcome = {
  duplicate: boolean;
  import: {
    id: string;
    fileSha256: string;
    rowsTotal: number;
    rowsStored: number;
    rowsRejected: number;
    report: { line: number; reason: string }[];
    mapping: Record<string, string>;
  };
  alreadyStored: number;
  repeats: number;
  earlier: { id: string }[];
};
type ErrorBody = { error: { code: string; message: string; field?: string } };

let c: pg.Client;
let farm: TestFarm;
const people = {} as Record<"owner" | "keeper" | "viewer", Session>;
const PASSWORD = "import-test-pass";

function upload(s: Session, farmId: string, name: string, csv: string, fields: Record<string, string>) {
  const form = new FormData();
  form.set("file", new File([csv], name, { type: "text/csv" }));
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  return s.fetch(`/api/farms/${farmId}/imports`, { method: "POST", body: form });
}
const readingsOf = async (ids: number[]) => Number((await c.query(`select count(*)::int as n from readings where probe_id = any($1)`, [ids])).rows[0].n);
const importsOf = async (farmId: string) => Number((await c.query(`select count(*)::int as n from imports where farm_id = $1`, [farmId])).rows[0].n);

const day = (d: number, hh: string) => `2025-03-${String(d).padStart(2, "0")} ${hh}`;

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  farm = await makeFarm(c, { zones: ["fresh", "curing"], timezone: "Europe/Dublin" });
  for (const role of ["owner", "keeper", "viewer"] as const) people[role] = await signIn(await addMember(c, farm.farmId, role, PASSWORD), PASSWORD);
});

afterAll(async () => {
  await c.end();
});

describe("importing a logger CSV", () => {
  it("stores the good rows and reports each bad row with its line number and reason", async () => {
    const [a, b] = farm.probes.map((p) => p.code) as [string, string];
    const csv = [
      "Timestamp;Sensor;Quantity;Reading;Unit",
      `${day(1, "08:00")};${a};temperature;21,5;°C`, // 2
      `${day(1, "08:00")};${a};moisture;78,1;%`, // 3
      `${day(1, "08:05")};${a};temperature;70,7;°F`, // 4 → 21.5 °C
      `${day(1, "08:10")};nobody;temperature;21;°C`, // 5 unknown probe
      "",
      `${day(1, "08:15")};${b};temperature;warm;°C`, // 7 not a number
      `31/03/2025 08:20;${b};temperature;20;°C`, // 8 time format
      `${day(1, "08:25")};${b};moisture;104;%`, // 9 out of range
      `${day(1, "08:30")};${b};pressure;1013;hPa`, // 10 unknown metric
      `${day(1, "08:35")};${b};nh3;3,5;ppm`, // 11
    ].join("\r\n");
    const res = await upload(people.owner, farm.farmId, "logger-march.csv", csv, {
      time: "Timestamp",
      probe: "Sensor",
      metric: "Quantity",
      value: "Reading",
      unit: "Unit",
      timezone: "Europe/Dublin",
    });
    expect(res.status, await res.clone().text()).toBe(201);
    const out = (await res.json()) as Outcome;
    expect(out.duplicate).toBe(false);
    expect(out.import).toMatchObject({ rowsTotal: 9, rowsStored: 4, rowsRejected: 5 });
    expect(out.import.fileSha256).toBe(createHash("sha256").update(csv).digest("hex"));
    expect(out.import.report.map((r) => r.line)).toEqual([5, 7, 8, 9, 10]);
    expect(out.import.report[0]!.reason).toBe('probe (column "Sensor"): no probe "nobody" on this farm');
    expect(out.import.report[1]!.reason).toBe('value (column "Reading"): "warm" is not a number');
    expect(out.import.report[2]!.reason).toMatch(/^time \(column "Timestamp"\)/);
    expect(out.import.report[3]!.reason).toMatch(/^value \(column "Reading"\): 104 % is outside/);
    expect(out.import.report[4]!.reason).toMatch(/^measure \(column "Quantity"\): "pressure"/);

    // 1 March is winter time in Dublin (UTC+0): 08:00 local is 08:00Z.
    const rows = await c.query(
      `select p.code, r.metric::text, r.ts, r.value from readings r join probes p on p.id = r.probe_id where r.probe_id = any($1) order by r.ts, r.metric`,
      [farm.probes.map((p) => p.id)],
    );
    expect(rows.rows.map((r) => [r.code, r.metric, new Date(r.ts).toISOString(), +Number(r.value).toFixed(4)])).toEqual([
      [a, "temperature", "2025-03-01T08:00:00.000Z", 21.5],
      [a, "moisture", "2025-03-01T08:00:00.000Z", 78.1],
      [a, "temperature", "2025-03-01T08:05:00.000Z", 21.5],
      [b, "ammonia", "2025-03-01T08:35:00.000Z", 3.5],
    ]);
    const kept = await c.query(`select rows_stored, rows_rejected, report, mapping from imports where id = $1`, [out.import.id]);
    expect(kept.rows[0]).toMatchObject({ rows_stored: 4, rows_rejected: 5, mapping: { time: "Timestamp", probe: "Sensor", unit: "Unit" } });
    expect(kept.rows[0].report).toHaveLength(5);
    // One rejection row for the file, counting its refused lines; the import's report lists each.
    const rejected = await c.query(`select reason, records from rejected_messages where farm_id = $1 and source = 'csv' order by id`, [farm.farmId]);
    expect(rejected.rows).toHaveLength(1);
    expect(rejected.rows[0].records).toBe(5);
    expect((rejected.rows[0].reason as string).split("\n").map((l) => l.split(":")[0])).toEqual(["line 5", "line 7", "line 8", "line 9", "line 10"]);
  });

  it("the same file uploaded again adds nothing and says it was already imported", async () => {
    const code = farm.probes[1]!.code;
    const csv = `time,probe,metric,value\n${day(2, "10:00")},${code},temperature,19.5\n${day(2, "10:01")},${code},temperature,19.6\n${day(2, "10:02")},${code},temperature,19.6\n`;
    const fields = { time: "time", probe: "probe", metric: "metric", value: "value", timezone: "UTC" };
    const first = (await (await upload(people.owner, farm.farmId, "tote.csv", csv, fields)).json()) as Outcome;
    expect(first.import.rowsStored).toBe(3);
    const readingsBefore = await readingsOf([farm.probes[1]!.id]);
    const importsBefore = await importsOf(farm.farmId);

    const again = await upload(people.owner, farm.farmId, "tote (copy).csv", csv, fields);
    expect(again.status).toBe(200);
    const second = (await again.json()) as Outcome;
    expect(second.duplicate).toBe(true);
    expect(second.import.id).toBe(first.import.id);
    expect(await readingsOf([farm.probes[1]!.id])).toBe(readingsBefore);
    expect(await importsOf(farm.farmId)).toBe(importsBefore);

    // The same file mapped another way (one metric for the whole file): its readings are already there.
    const remapped = await upload(people.owner, farm.farmId, "tote.csv", csv, {
      time: "time",
      probe: "probe",
      metricFixed: "temperature",
      value: "value",
      timezone: "UTC",
    });
    expect(remapped.status).toBe(201);
    const third = (await remapped.json()) as Outcome;
    expect(third).toMatchObject({ duplicate: false, alreadyStored: 3, import: { rowsStored: 0, rowsRejected: 0 } });
    expect(third.earlier.map((e) => e.id)).toEqual([first.import.id]);
    expect(await readingsOf([farm.probes[1]!.id])).toBe(readingsBefore);
  });

  it("keepers and viewers are refused with 403 and nothing is stored", async () => {
    const code = farm.probes[0]!.code;
    const csv = `time,probe,metric,value\n2025-03-05T10:00:00Z,${code},temperature,20\n`;
    const before = await readingsOf([farm.probes[0]!.id]);
    for (const role of ["keeper", "viewer"] as const) {
      const res = await upload(people[role], farm.farmId, "x.csv", csv, { time: "time", probe: "probe", metric: "metric", value: "value" });
      expect(res.status, role).toBe(403);
      expect(((await res.json()) as ErrorBody).error.code).toBe("forbidden");
    }
    expect(await readingsOf([farm.probes[0]!.id])).toBe(before);
  });

  it("a mapping naming a column the file lacks is refused with the field and the file's columns", async () => {
    const res = await upload(people.owner, farm.farmId, "x.csv", "Zeit,Fühler,Wert\n2025-03-05T10:00:00Z,a,1\n", {
      time: "time",
      probe: "Fühler",
      metricFixed: "temperature",
      value: "Wert",
    });
    expect(res.status).toBe(422);
    const e = ((await res.json()) as ErrorBody).error;
    expect(e).toMatchObject({ code: "invalid", field: "time" });
    expect(e.message).toBe('The file has no column "time" for the time; its columns are "Zeit", "Fühler", "Wert".');
  });

  it("a form without a probe or metric choice is refused naming the field", async () => {
    const res = await upload(people.owner, farm.farmId, "x.csv", "time,value\n2025-03-05T10:00:00Z,1\n", {
      time: "time",
      value: "value",
      metricFixed: "temperature",
    });
    expect(res.status).toBe(422);
    expect(((await res.json()) as ErrorBody).error.field).toBe("probe");
  });

  it("the farm's import history lists the imports with their reports", async () => {
    const res = await people.viewer.fetch(`/api/farms/${farm.farmId}/imports`);
    expect(res.status).toBe(200);
    const { imports } = (await res.json()) as { imports: { fileName: string; rowsRejected: number }[] };
    expect(imports.map((i) => i.fileName)).toContain("logger-march.csv");
    expect(imports.find((i) => i.fileName === "logger-march.csv")!.rowsRejected).toBe(5);
  });
});
