CREATE TABLE "reading_daily_rollups" (
	"probe_id" integer NOT NULL,
	"metric" "metric" NOT NULL,
	"day" timestamp with time zone NOT NULL,
	"min" double precision NOT NULL,
	"max" double precision NOT NULL,
	"sum" double precision NOT NULL,
	"count" integer NOT NULL,
	CONSTRAINT "reading_daily_rollups_probe_id_metric_day_pk" PRIMARY KEY("probe_id","metric","day")
);
--> statement-breakpoint
CREATE TABLE "reading_daily_state" (
	"probe_id" integer PRIMARY KEY NOT NULL,
	"timezone" text NOT NULL,
	"done_through" timestamp with time zone NOT NULL
);
