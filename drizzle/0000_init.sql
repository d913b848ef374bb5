CREATE TYPE "public"."batch_status" AS ENUM('running', 'committed', 'failed', 'undone');--> statement-breakpoint
CREATE TYPE "public"."decision_kind" AS ENUM('reuse', 'lap', 'recut_seat', 'reface_valve', 'replace_valve', 'replace_seat', 'replace_guide', 'knurl_guide');--> statement-breakpoint
CREATE TYPE "public"."head_status" AS ENUM('received', 'inspected', 'in_rework', 'final_check', 'released');--> statement-breakpoint
CREATE TYPE "public"."leak_path" AS ENUM('none', 'intake', 'exhaust', 'crankcase', 'coolant');--> statement-breakpoint
CREATE TYPE "public"."measurement" AS ENUM('stem_diameter', 'guide_bore', 'clearance', 'face_runout', 'seat_runout', 'seat_width', 'margin', 'roughness_ra', 'vacuum_hold', 'fluid_hold', 'leakdown');--> statement-breakpoint
CREATE TYPE "public"."role" AS ENUM('owner', 'engineer', 'machinist', 'viewer');--> statement-breakpoint
CREATE TYPE "public"."side" AS ENUM('intake', 'exhaust');--> statement-breakpoint
CREATE TYPE "public"."stage" AS ENUM('as_received', 'final');--> statement-breakpoint
CREATE TABLE "account" (
	"user_id" text NOT NULL,
	"type" text NOT NULL,
	"provider" text NOT NULL,
	"provider_account_id" text NOT NULL,
	"refresh_token" text,
	"access_token" text,
	"expires_at" integer,
	"token_type" text,
	"scope" text,
	"id_token" text,
	"session_state" text,
	CONSTRAINT "account_provider_provider_account_id_pk" PRIMARY KEY("provider","provider_account_id")
);
--> statement-breakpoint
CREATE TABLE "session" (
	"session_token" text PRIMARY KEY NOT NULL,
	"user_id" text NOT NULL,
	"expires" timestamp with time zone NOT NULL
);
--> statement-breakpoint
CREATE TABLE "user" (
	"id" text PRIMARY KEY NOT NULL,
	"name" text,
	"email" text NOT NULL,
	"email_verified" timestamp with time zone,
	"image" text,
	"password_hash" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "user_email_unique" UNIQUE("email")
);
--> statement-breakpoint
CREATE TABLE "verificationToken" (
	"identifier" text NOT NULL,
	"token" text NOT NULL,
	"expires" timestamp with time zone NOT NULL,
	CONSTRAINT "verificationToken_identifier_token_pk" PRIMARY KEY("identifier","token")
);
--> statement-breakpoint
CREATE TABLE "memberships" (
	"shop_id" uuid NOT NULL,
	"user_id" text NOT NULL,
	"role" "role" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "memberships_shop_id_user_id_pk" PRIMARY KEY("shop_id","user_id")
);
--> statement-breakpoint
CREATE TABLE "shops" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"name" text NOT NULL,
	"slug" text NOT NULL,
	"settings" jsonb DEFAULT '{}'::jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "shops_slug_unique" UNIQUE("slug"),
	CONSTRAINT "shops_name_not_blank" CHECK (length(trim("shops"."name")) between 1 and 120),
	CONSTRAINT "shops_slug_format" CHECK ("shops"."slug" ~ '^[a-z0-9][a-z0-9-]{1,62}$')
);
--> statement-breakpoint
CREATE TABLE "families" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"code" text NOT NULL,
	"description" text DEFAULT '' NOT NULL,
	"cylinders" smallint NOT NULL,
	"intake_valves" smallint NOT NULL,
	"exhaust_valves" smallint NOT NULL,
	"intake_stem_mm" double precision,
	"exhaust_stem_mm" double precision,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "families_shop_code_key" UNIQUE("shop_id","code"),
	CONSTRAINT "families_shop_id_key" UNIQUE("shop_id","id"),
	CONSTRAINT "families_code_format" CHECK ("families"."code" ~ '^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$'),
	CONSTRAINT "families_cylinders_range" CHECK ("families"."cylinders" between 1 and 16),
	CONSTRAINT "families_intake_valves_range" CHECK ("families"."intake_valves" between 1 and 3),
	CONSTRAINT "families_exhaust_valves_range" CHECK ("families"."exhaust_valves" between 1 and 3),
	CONSTRAINT "families_intake_stem_range" CHECK ("families"."intake_stem_mm" is null or "families"."intake_stem_mm" between 3 and 20),
	CONSTRAINT "families_exhaust_stem_range" CHECK ("families"."exhaust_stem_mm" is null or "families"."exhaust_stem_mm" between 3 and 20)
);
--> statement-breakpoint
CREATE TABLE "limits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"family_id" uuid NOT NULL,
	"measurement" "measurement" NOT NULL,
	"side" "side" NOT NULL,
	"stage" "stage" NOT NULL,
	"min" double precision,
	"max" double precision,
	"effective_from" date NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "limits_version_key" UNIQUE("family_id","measurement","side","stage","effective_from"),
	CONSTRAINT "limits_has_bound" CHECK ("limits"."min" is not null or "limits"."max" is not null),
	CONSTRAINT "limits_min_le_max" CHECK ("limits"."min" is null or "limits"."max" is null or "limits"."min" <= "limits"."max"),
	CONSTRAINT "limits_non_negative" CHECK (coalesce("limits"."min", 0) >= 0 and coalesce("limits"."max", 0) >= 0)
);
--> statement-breakpoint
CREATE TABLE "cylinder_leakage" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"head_id" uuid NOT NULL,
	"cylinder" smallint NOT NULL,
	"leakage_pct" double precision NOT NULL,
	"pressure_in_kpa" double precision,
	"pressure_held_kpa" double precision,
	"leak_path" "leak_path" DEFAULT 'none' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "cylinder_leakage_head_cylinder_key" UNIQUE("head_id","cylinder"),
	CONSTRAINT "cylinder_leakage_cylinder_range" CHECK ("cylinder_leakage"."cylinder" between 1 and 16),
	CONSTRAINT "cylinder_leakage_pct_range" CHECK ("cylinder_leakage"."leakage_pct" between 0 and 100),
	CONSTRAINT "cylinder_leakage_pressures" CHECK (("cylinder_leakage"."pressure_in_kpa" is null and "cylinder_leakage"."pressure_held_kpa" is null) or ("cylinder_leakage"."pressure_in_kpa" > 0 and "cylinder_leakage"."pressure_held_kpa" between 0 and "cylinder_leakage"."pressure_in_kpa"))
);
--> statement-breakpoint
CREATE TABLE "decisions" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"head_id" uuid NOT NULL,
	"cylinder" smallint NOT NULL,
	"side" "side" NOT NULL,
	"valve" smallint NOT NULL,
	"suggested" "decision_kind",
	"rule" text DEFAULT '' NOT NULL,
	"kind" "decision_kind" NOT NULL,
	"note" text DEFAULT '' NOT NULL,
	"decided_by" text,
	"decided_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "decisions_position_key" UNIQUE("head_id","cylinder","side","valve"),
	CONSTRAINT "decisions_cylinder_range" CHECK ("decisions"."cylinder" between 1 and 16),
	CONSTRAINT "decisions_valve_range" CHECK ("decisions"."valve" between 1 and 3)
);
--> statement-breakpoint
CREATE TABLE "heads" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"family_id" uuid NOT NULL,
	"serial" text NOT NULL,
	"customer" text DEFAULT '' NOT NULL,
	"customer_email" text,
	"received_on" date NOT NULL,
	"released_on" date,
	"mileage_km" integer,
	"engine_hours" integer,
	"complaint" text DEFAULT '' NOT NULL,
	"status" "head_status" DEFAULT 'received' NOT NULL,
	"comeback_of" uuid,
	"created_by_batch" uuid,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "heads_shop_serial_key" UNIQUE("shop_id","serial"),
	CONSTRAINT "heads_shop_id_family_key" UNIQUE("shop_id","id","family_id"),
	CONSTRAINT "heads_shop_id_key" UNIQUE("shop_id","id"),
	CONSTRAINT "heads_serial_format" CHECK (length(trim("heads"."serial")) between 1 and 64),
	CONSTRAINT "heads_mileage_range" CHECK ("heads"."mileage_km" is null or "heads"."mileage_km" between 0 and 5000000),
	CONSTRAINT "heads_hours_range" CHECK ("heads"."engine_hours" is null or "heads"."engine_hours" between 0 and 500000),
	CONSTRAINT "heads_released_after_received" CHECK ("heads"."released_on" is null or "heads"."released_on" >= "heads"."received_on"),
	CONSTRAINT "heads_released_status" CHECK (("heads"."status" = 'released') = ("heads"."released_on" is not null)),
	CONSTRAINT "heads_not_own_comeback" CHECK ("heads"."comeback_of" is null or "heads"."comeback_of" <> "heads"."id")
);
--> statement-breakpoint
CREATE TABLE "instruments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"name" text NOT NULL,
	"kind" text NOT NULL,
	"serial" text NOT NULL,
	"resolution_mm" double precision,
	"calibrated_on" date NOT NULL,
	"interval_days" integer NOT NULL,
	"retired" boolean DEFAULT false NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "instruments_shop_serial_key" UNIQUE("shop_id","serial"),
	CONSTRAINT "instruments_shop_id_key" UNIQUE("shop_id","id"),
	CONSTRAINT "instruments_interval_range" CHECK ("instruments"."interval_days" between 1 and 3650),
	CONSTRAINT "instruments_resolution_range" CHECK ("instruments"."resolution_mm" is null or "instruments"."resolution_mm" > 0),
	CONSTRAINT "instruments_name_not_blank" CHECK (length(trim("instruments"."name")) > 0)
);
--> statement-breakpoint
CREATE TABLE "import_batches" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"file_name" text NOT NULL,
	"content_hash" text NOT NULL,
	"layout" text NOT NULL,
	"on_reject" text NOT NULL,
	"status" "batch_status" DEFAULT 'running' NOT NULL,
	"rows_accepted" integer DEFAULT 0 NOT NULL,
	"rows_rejected" integer DEFAULT 0 NOT NULL,
	"readings" integer DEFAULT 0 NOT NULL,
	"duplicates" integer DEFAULT 0 NOT NULL,
	"created_heads" integer DEFAULT 0 NOT NULL,
	"bytes" integer DEFAULT 0 NOT NULL,
	"error" text,
	"created_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"finished_at" timestamp with time zone,
	CONSTRAINT "import_batches_shop_id_key" UNIQUE("shop_id","id"),
	CONSTRAINT "import_batches_layout" CHECK ("import_batches"."layout" in ('wide', 'long')),
	CONSTRAINT "import_batches_on_reject" CHECK ("import_batches"."on_reject" in ('abort', 'skip')),
	CONSTRAINT "import_batches_counts" CHECK ("import_batches"."rows_accepted" >= 0 and "import_batches"."rows_rejected" >= 0 and "import_batches"."readings" >= 0 and "import_batches"."duplicates" >= 0 and "import_batches"."created_heads" >= 0)
);
--> statement-breakpoint
CREATE TABLE "import_rejects" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"batch_id" uuid NOT NULL,
	"line" integer NOT NULL,
	"raw" text NOT NULL,
	"reason" text NOT NULL,
	CONSTRAINT "import_rejects_line_positive" CHECK ("import_rejects"."line" >= 1)
);
--> statement-breakpoint
CREATE TABLE "readings" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "readings_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"shop_id" uuid NOT NULL,
	"head_id" uuid NOT NULL,
	"family_id" uuid NOT NULL,
	"stage" "stage" NOT NULL,
	"cylinder" smallint NOT NULL,
	"side" "side" NOT NULL,
	"valve" smallint NOT NULL,
	"measurement" "measurement" NOT NULL,
	"value" double precision NOT NULL,
	"measured_at" timestamp with time zone NOT NULL,
	"measured_by" text NOT NULL,
	"instrument_id" uuid,
	"batch_id" uuid,
	CONSTRAINT "readings_identity_key" UNIQUE("head_id","stage","cylinder","side","valve","measurement","measured_at"),
	CONSTRAINT "readings_cylinder_range" CHECK ("readings"."cylinder" between 1 and 16),
	CONSTRAINT "readings_valve_range" CHECK ("readings"."valve" between 1 and 3),
	CONSTRAINT "readings_value_finite" CHECK ("readings"."value" >= 0 and "readings"."value" < 'Infinity'::float8),
	CONSTRAINT "readings_value_plausible" CHECK (case "readings"."measurement"
				when 'clearance' then "readings"."value" <= 1
				when 'face_runout' then "readings"."value" <= 2
				when 'seat_runout' then "readings"."value" <= 2
				when 'stem_diameter' then "readings"."value" between 1 and 30
				when 'guide_bore' then "readings"."value" between 1 and 30
				when 'seat_width' then "readings"."value" <= 10
				when 'margin' then "readings"."value" <= 10
				when 'roughness_ra' then "readings"."value" <= 50
				when 'vacuum_hold' then "readings"."value" <= 100
				when 'leakdown' then "readings"."value" <= 100
				when 'fluid_hold' then "readings"."value" <= 3600
				else true end),
	CONSTRAINT "readings_measured_by_not_blank" CHECK (length(trim("readings"."measured_by")) between 1 and 120)
);
--> statement-breakpoint
CREATE TABLE "api_tokens" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"user_id" text NOT NULL,
	"name" text NOT NULL,
	"prefix" text NOT NULL,
	"token_hash" text NOT NULL,
	"role" "role" NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone,
	"last_used_at" timestamp with time zone,
	"revoked_at" timestamp with time zone,
	CONSTRAINT "api_tokens_tokenHash_unique" UNIQUE("token_hash"),
	CONSTRAINT "api_tokens_name_not_blank" CHECK (length(trim("api_tokens"."name")) between 1 and 80),
	CONSTRAINT "api_tokens_hash_format" CHECK ("api_tokens"."token_hash" ~ '^[0-9a-f]{64}$')
);
--> statement-breakpoint
CREATE TABLE "audit_log" (
	"id" bigint PRIMARY KEY GENERATED ALWAYS AS IDENTITY (sequence name "audit_log_id_seq" INCREMENT BY 1 MINVALUE 1 MAXVALUE 9223372036854775807 START WITH 1 CACHE 1),
	"shop_id" uuid NOT NULL,
	"actor_user_id" text,
	"actor_label" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"entity" text NOT NULL,
	"entity_id" text NOT NULL,
	"action" text NOT NULL,
	"before" jsonb,
	"after" jsonb,
	CONSTRAINT "audit_log_action" CHECK ("audit_log"."action" in ('create', 'update', 'delete', 'undo', 'override', 'revoke', 'import'))
);
--> statement-breakpoint
CREATE TABLE "mail_outbox" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid,
	"to" text NOT NULL,
	"subject" text NOT NULL,
	"text" text NOT NULL,
	"html" text,
	"kind" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"sent_at" timestamp with time zone,
	"attempts" integer DEFAULT 0 NOT NULL,
	"last_error" text,
	"next_attempt_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "mail_outbox_to_format" CHECK ("mail_outbox"."to" ~ '^[^@\s]+@[^@\s]+$' and length("mail_outbox"."to") <= 254)
);
--> statement-breakpoint
CREATE TABLE "invitations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"email" text NOT NULL,
	"role" "role" NOT NULL,
	"token_hash" text NOT NULL,
	"invited_by" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"accepted_at" timestamp with time zone,
	"revoked_at" timestamp with time zone,
	CONSTRAINT "invitations_tokenHash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "password_resets" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"user_id" text NOT NULL,
	"token_hash" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"used_at" timestamp with time zone,
	CONSTRAINT "password_resets_tokenHash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "sign_in_attempts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"client" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL,
	"succeeded" text DEFAULT 'no' NOT NULL,
	CONSTRAINT "sign_in_attempts_succeeded" CHECK ("sign_in_attempts"."succeeded" in ('yes', 'no'))
);
--> statement-breakpoint
ALTER TABLE "account" ADD CONSTRAINT "account_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "session" ADD CONSTRAINT "session_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "memberships" ADD CONSTRAINT "memberships_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "families" ADD CONSTRAINT "families_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "limits" ADD CONSTRAINT "limits_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "limits" ADD CONSTRAINT "limits_family_fk" FOREIGN KEY ("shop_id","family_id") REFERENCES "public"."families"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "cylinder_leakage" ADD CONSTRAINT "cylinder_leakage_head_fk" FOREIGN KEY ("shop_id","head_id") REFERENCES "public"."heads"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "decisions" ADD CONSTRAINT "decisions_decided_by_user_id_fk" FOREIGN KEY ("decided_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "decisions" ADD CONSTRAINT "decisions_head_fk" FOREIGN KEY ("shop_id","head_id") REFERENCES "public"."heads"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "heads" ADD CONSTRAINT "heads_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "heads" ADD CONSTRAINT "heads_comeback_of_heads_id_fk" FOREIGN KEY ("comeback_of") REFERENCES "public"."heads"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "heads" ADD CONSTRAINT "heads_family_fk" FOREIGN KEY ("shop_id","family_id") REFERENCES "public"."families"("shop_id","id") ON DELETE no action ON UPDATE cascade;--> statement-breakpoint
ALTER TABLE "instruments" ADD CONSTRAINT "instruments_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_batches" ADD CONSTRAINT "import_batches_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_batches" ADD CONSTRAINT "import_batches_created_by_user_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "import_rejects" ADD CONSTRAINT "import_rejects_batch_fk" FOREIGN KEY ("shop_id","batch_id") REFERENCES "public"."import_batches"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_head_fk" FOREIGN KEY ("shop_id","head_id","family_id") REFERENCES "public"."heads"("shop_id","id","family_id") ON DELETE cascade ON UPDATE cascade;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_instrument_fk" FOREIGN KEY ("shop_id","instrument_id") REFERENCES "public"."instruments"("shop_id","id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "readings" ADD CONSTRAINT "readings_batch_fk" FOREIGN KEY ("shop_id","batch_id") REFERENCES "public"."import_batches"("shop_id","id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "api_tokens" ADD CONSTRAINT "api_tokens_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "api_tokens" ADD CONSTRAINT "api_tokens_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "audit_log" ADD CONSTRAINT "audit_log_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_invited_by_user_id_fk" FOREIGN KEY ("invited_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "password_resets" ADD CONSTRAINT "password_resets_user_id_user_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."user"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "memberships_user_idx" ON "memberships" USING btree ("user_id");--> statement-breakpoint
CREATE INDEX "limits_lookup_idx" ON "limits" USING btree ("shop_id","family_id","measurement","stage","side","effective_from");--> statement-breakpoint
CREATE INDEX "decisions_shop_kind_idx" ON "decisions" USING btree ("shop_id","kind");--> statement-breakpoint
CREATE INDEX "heads_shop_received_idx" ON "heads" USING btree ("shop_id","received_on");--> statement-breakpoint
CREATE INDEX "heads_family_idx" ON "heads" USING btree ("family_id");--> statement-breakpoint
CREATE INDEX "heads_comeback_idx" ON "heads" USING btree ("comeback_of");--> statement-breakpoint
CREATE INDEX "instruments_shop_idx" ON "instruments" USING btree ("shop_id");--> statement-breakpoint
CREATE UNIQUE INDEX "import_batches_committed_hash_key" ON "import_batches" USING btree ("shop_id","content_hash") WHERE "import_batches"."status" = 'committed';--> statement-breakpoint
CREATE INDEX "import_batches_shop_created_idx" ON "import_batches" USING btree ("shop_id","created_at");--> statement-breakpoint
CREATE INDEX "import_rejects_batch_idx" ON "import_rejects" USING btree ("batch_id","line");--> statement-breakpoint
CREATE INDEX "readings_analytics_idx" ON "readings" USING btree ("shop_id","measurement","stage","side","family_id");--> statement-breakpoint
CREATE INDEX "readings_batch_idx" ON "readings" USING btree ("batch_id");--> statement-breakpoint
CREATE INDEX "api_tokens_shop_idx" ON "api_tokens" USING btree ("shop_id","created_at");--> statement-breakpoint
CREATE INDEX "audit_log_shop_at_idx" ON "audit_log" USING btree ("shop_id","at");--> statement-breakpoint
CREATE INDEX "audit_log_entity_idx" ON "audit_log" USING btree ("shop_id","entity","entity_id");--> statement-breakpoint
CREATE INDEX "mail_outbox_pending_idx" ON "mail_outbox" USING btree ("next_attempt_at") WHERE "mail_outbox"."sent_at" is null;--> statement-breakpoint
CREATE INDEX "invitations_shop_idx" ON "invitations" USING btree ("shop_id","created_at");--> statement-breakpoint
CREATE INDEX "sign_in_attempts_email_idx" ON "sign_in_attempts" USING btree ("email","at");--> statement-breakpoint
CREATE INDEX "sign_in_attempts_client_idx" ON "sign_in_attempts" USING btree ("client","at");