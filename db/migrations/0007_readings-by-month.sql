-- Readings partitioned by month on ts, managed by pg_partman 4.x (Debian's postgresql-15-partman,
-- which db/local-pg.ts installs; a server named by DATABASE_URL needs it too, and a superuser to
-- create the extension). The rows of the unpartitioned table move into the new one here, once.
-- Monthly boundaries are cut in UTC: pg_partman computes them in the session's time zone, so this
-- migration and the maintenance job (db/queries/partitions.ts) both run with TimeZone = UTC.
SET LOCAL TimeZone = 'UTC';
--> statement-breakpoint
CREATE SCHEMA IF NOT EXISTS partman;
--> statement-breakpoint
CREATE EXTENSION IF NOT EXISTS pg_partman SCHEMA partman;
--> statement-breakpoint
ALTER TABLE "readings" RENAME TO "readings_unpartitioned";
--> statement-breakpoint
ALTER TABLE "readings_unpartitioned" RENAME CONSTRAINT "readings_probe_id_metric_ts_pk" TO "readings_unpartitioned_pk";
--> statement-breakpoint
-- The key holds ts, the partition key, as the key of a partitioned table must; it still makes a
-- resent reading (same probe, metric and time) a no-op for insertReadings' ON CONFLICT DO NOTHING.
CREATE TABLE "readings" (
	"probe_id" integer NOT NULL,
	"metric" "metric" NOT NULL,
	"ts" timestamp with time zone NOT NULL,
	"value" double precision NOT NULL,
	CONSTRAINT "readings_probe_id_metric_ts_pk" PRIMARY KEY("probe_id","metric","ts")
) PARTITION BY RANGE ("ts");
--> statement-breakpoint
-- Partitions from the month of the oldest reading (at most 5 years back; older ones land in the
-- default partition), or a year back on an empty table (a demo or an import of last year's
-- records finds its months), to 4 months ahead (pg_partman's default premake). Later months are
-- made ahead by partman.run_maintenance, which the ingest service calls every hour.
DO $$
DECLARE
  oldest timestamptz := (SELECT min("ts") FROM "readings_unpartitioned");
  start timestamptz := date_trunc('month', greatest(coalesce(least(oldest, now() - interval '12 months'), now() - interval '12 months'), now() - interval '5 years'));
BEGIN
  PERFORM partman.create_parent(
    p_parent_table := 'public.readings',
    p_control := 'ts',
    p_type := 'native',
    p_interval := 'monthly',
    p_premake := 4,
    p_start_partition := start::text,
    p_jobmon := false
  );
END $$;
--> statement-breakpoint
-- Make months ahead of now() even when no reading has arrived lately; keep raw readings until a
-- retention is set (READINGS_RETENTION_MONTHS; then whole months are dropped, rollups stay).
UPDATE partman.part_config SET infinite_time_partitions = true, retention = NULL, retention_keep_table = false, retention_keep_index = false
WHERE parent_table = 'public.readings';
--> statement-breakpoint
INSERT INTO "readings" ("probe_id", "metric", "ts", "value")
SELECT "probe_id", "metric", "ts", "value" FROM "readings_unpartitioned";
--> statement-breakpoint
DROP TABLE "readings_unpartitioned";
--> statement-breakpoint
ANALYZE "readings";
