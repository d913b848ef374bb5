CREATE TABLE "shop_signups" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"email" text NOT NULL,
	"owner_name" text NOT NULL,
	"password_hash" text NOT NULL,
	"shop_name" text NOT NULL,
	"length_unit" text NOT NULL,
	"distance_unit" text NOT NULL,
	"currency" text NOT NULL,
	"token_hash" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"confirmed_at" timestamp with time zone,
	"shop_id" uuid,
	CONSTRAINT "shop_signups_tokenHash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
ALTER TABLE "shops" ADD COLUMN "length_unit" text DEFAULT 'mm' NOT NULL;--> statement-breakpoint
ALTER TABLE "shops" ADD COLUMN "distance_unit" text DEFAULT 'km' NOT NULL;--> statement-breakpoint
ALTER TABLE "shops" ADD COLUMN "currency" text DEFAULT 'EUR' NOT NULL;--> statement-breakpoint
ALTER TABLE "shop_signups" ADD CONSTRAINT "shop_signups_shop_id_shops_id_fk" FOREIGN KEY ("shop_id") REFERENCES "public"."shops"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "shop_signups_email_idx" ON "shop_signups" USING btree ("email","created_at");--> statement-breakpoint
ALTER TABLE "shops" ADD CONSTRAINT "shops_length_unit" CHECK ("shops"."length_unit" in ('mm', 'in'));--> statement-breakpoint
ALTER TABLE "shops" ADD CONSTRAINT "shops_distance_unit" CHECK ("shops"."distance_unit" in ('km', 'mi'));--> statement-breakpoint
ALTER TABLE "shops" ADD CONSTRAINT "shops_currency_code" CHECK ("shops"."currency" ~ '^[A-Z]{3}$');