CREATE TABLE "shifts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"farm_id" uuid NOT NULL,
	"bin_id" uuid NOT NULL,
	"zone_id" uuid,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"by_user_id" uuid,
	"notes" text,
	"client_key" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"to_zone_id" uuid,
	"volume_l" real
);
--> statement-breakpoint
ALTER TABLE "bins" ADD COLUMN "feeding_interval_days" smallint;--> statement-breakpoint
ALTER TABLE "bins" ADD COLUMN "planned_harvest_on" date;--> statement-breakpoint
ALTER TABLE "farms" ADD COLUMN "feeding_interval_days" smallint DEFAULT 21 NOT NULL;--> statement-breakpoint
ALTER TABLE "feedings" ADD COLUMN "client_key" text;--> statement-breakpoint
ALTER TABLE "harvests" ADD COLUMN "client_key" text;--> statement-breakpoint
ALTER TABLE "harvests" ADD COLUMN "volume_l" real;--> statement-breakpoint
ALTER TABLE "log_notes" ADD COLUMN "client_key" text;--> statement-breakpoint
ALTER TABLE "oven_dry_samples" ADD COLUMN "client_key" text;--> statement-breakpoint
ALTER TABLE "waterings" ADD COLUMN "client_key" text;--> statement-breakpoint
ALTER TABLE "shifts" ADD CONSTRAINT "shifts_farm_id_farms_id_fk" FOREIGN KEY ("farm_id") REFERENCES "public"."farms"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shifts" ADD CONSTRAINT "shifts_bin_id_bins_id_fk" FOREIGN KEY ("bin_id") REFERENCES "public"."bins"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shifts" ADD CONSTRAINT "shifts_zone_id_zones_id_fk" FOREIGN KEY ("zone_id") REFERENCES "public"."zones"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shifts" ADD CONSTRAINT "shifts_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shifts" ADD CONSTRAINT "shifts_to_zone_id_zones_id_fk" FOREIGN KEY ("to_zone_id") REFERENCES "public"."zones"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "shifts_bin_at_idx" ON "shifts" USING btree ("bin_id","at");--> statement-breakpoint
CREATE UNIQUE INDEX "shifts_client_key_uq" ON "shifts" USING btree ("farm_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "feedings_client_key_uq" ON "feedings" USING btree ("farm_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "harvests_client_key_uq" ON "harvests" USING btree ("farm_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "log_notes_client_key_uq" ON "log_notes" USING btree ("farm_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "samples_client_key_uq" ON "oven_dry_samples" USING btree ("farm_id","client_key");--> statement-breakpoint
CREATE UNIQUE INDEX "waterings_client_key_uq" ON "waterings" USING btree ("farm_id","client_key");