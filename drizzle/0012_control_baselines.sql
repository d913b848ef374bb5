CREATE TABLE "control_baselines" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"shop_id" uuid NOT NULL,
	"family_id" uuid NOT NULL,
	"measurement" "measurement" NOT NULL,
	"stage" "stage" NOT NULL,
	"side" "side" NOT NULL,
	"from_day" date NOT NULL,
	"to_day" date NOT NULL,
	"n" integer NOT NULL,
	"centre" double precision NOT NULL,
	"mr_bar" double precision NOT NULL,
	"set_by" text,
	"set_by_label" text NOT NULL,
	"set_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "control_baselines_series_key" UNIQUE("shop_id","family_id","measurement","stage","side"),
	CONSTRAINT "control_baselines_days" CHECK ("control_baselines"."from_day" <= "control_baselines"."to_day"),
	CONSTRAINT "control_baselines_n" CHECK ("control_baselines"."n" >= 2),
	CONSTRAINT "control_baselines_mr_bar" CHECK ("control_baselines"."mr_bar" >= 0)
);
--> statement-breakpoint
ALTER TABLE "control_baselines" ADD CONSTRAINT "control_baselines_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "control_baselines" ADD CONSTRAINT "control_baselines_set_by_user_id_fk" FOREIGN KEY ("set_by") REFERENCES "public"."user"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "control_baselines" ADD CONSTRAINT "control_baselines_family_fk" FOREIGN KEY ("shop_id","family_id") REFERENCES "public"."families"("shop_id","id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
-- hand-written below
ALTER TABLE "control_baselines" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "control_baselines" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "control_baselines" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
