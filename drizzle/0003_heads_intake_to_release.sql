CREATE TYPE "public"."bore_direction" AS ENUM('along', 'across');--> statement-breakpoint
CREATE TYPE "public"."bore_height" AS ENUM('top', 'middle', 'bottom');--> statement-breakpoint
CREATE TABLE "comebacks" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"head_id" uuid NOT NULL,
	"original_head_id" uuid NOT NULL,
	"what_failed" text NOT NULL,
	"positions" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"recorded_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "comebacks_head_key" UNIQUE("head_id"),
	CONSTRAINT "comebacks_not_own" CHECK ("comebacks"."head_id" <> "comebacks"."original_head_id"),
	CONSTRAINT "comebacks_what_failed" CHECK (length(trim("comebacks"."what_failed")) between 1 and 2000),
	CONSTRAINT "comebacks_positions_array" CHECK (jsonb_typeof("comebacks"."positions") = 'array')
);
--> statement-breakpoint
CREATE TABLE "instrument_calibrations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"instrument_id" uuid NOT NULL,
	"calibrated_on" date NOT NULL,
	"interval_days" integer NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"recorded_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "instrument_calibrations_day_key" UNIQUE("instrument_id","calibrated_on"),
	CONSTRAINT "instrument_calibrations_interval_range" CHECK ("instrument_calibrations"."interval_days" between 1 and 3650)
);
--> statement-breakpoint
CREATE TABLE "bore_readings" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"head_id" uuid NOT NULL,
	"stage" "stage" NOT NULL,
	"cylinder" smallint NOT NULL,
	"side" "side" NOT NULL,
	"valve" smallint NOT NULL,
	"direction" "bore_direction" NOT NULL,
	"height" "bore_height" NOT NULL,
	"value_mm" double precision NOT NULL,
	"measured_at" timestamp with time zone NOT NULL,
	"measured_by" text NOT NULL,
	"instrument_id" uuid,
	"entered_by" text,
	CONSTRAINT "bore_readings_cell_key" UNIQUE("head_id","stage","cylinder","side","valve","direction","height"),
	CONSTRAINT "bore_readings_cylinder_range" CHECK ("bore_readings"."cylinder" between 1 and 16),
	CONSTRAINT "bore_readings_valve_range" CHECK ("bore_readings"."valve" between 1 and 3),
	CONSTRAINT "bore_readings_value_plausible" CHECK ("bore_readings"."value_mm" between 1 and 30),
	CONSTRAINT "bore_readings_measured_by_not_blank" CHECK (length(trim("bore_readings"."measured_by")) between 1 and 120)
);
--> statement-breakpoint
ALTER TABLE "heads" ADD COLUMN "released_by" text;--> statement-breakpoint
ALTER TABLE "heads" ADD COLUMN "release_override_reason" text;--> statement-breakpoint
ALTER TABLE "comebacks" ADD CONSTRAINT "comebacks_recorded_by_user_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comebacks" ADD CONSTRAINT "comebacks_head_fk" FOREIGN KEY ("shop_id","head_id") REFERENCES "public"."heads"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "comebacks" ADD CONSTRAINT "comebacks_original_fk" FOREIGN KEY ("shop_id","original_head_id") REFERENCES "public"."heads"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "instrument_calibrations" ADD CONSTRAINT "instrument_calibrations_recorded_by_user_id_fk" FOREIGN KEY ("recorded_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "instrument_calibrations" ADD CONSTRAINT "instrument_calibrations_instrument_fk" FOREIGN KEY ("shop_id","instrument_id") REFERENCES "public"."instruments"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bore_readings" ADD CONSTRAINT "bore_readings_entered_by_user_id_fk" FOREIGN KEY ("entered_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bore_readings" ADD CONSTRAINT "bore_readings_head_fk" FOREIGN KEY ("shop_id","head_id") REFERENCES "public"."heads"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "bore_readings" ADD CONSTRAINT "bore_readings_instrument_fk" FOREIGN KEY ("shop_id","instrument_id") REFERENCES "public"."instruments"("shop_id","id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "comebacks_original_idx" ON "comebacks" USING btree ("original_head_id");--> statement-breakpoint
ALTER TABLE "heads" ADD CONSTRAINT "heads_released_by_user_id_fk" FOREIGN KEY ("released_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "heads" ADD CONSTRAINT "heads_override_when_released" CHECK ("heads"."release_override_reason" is null or ("heads"."status" = 'released' and length(trim("heads"."release_override_reason")) between 10 and 2000));
--> statement-breakpoint
ALTER TABLE "bore_readings" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "bore_readings" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "bore_readings" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "comebacks" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "comebacks" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "comebacks" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "instrument_calibrations" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "instrument_calibrations" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "instrument_calibrations" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
