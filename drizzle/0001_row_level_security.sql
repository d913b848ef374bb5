-- Row-level security: the second line of defence behind the app's own shop scoping.
-- Every request runs its queries in a transaction that sets lapmark.shop_id (set_config(..., true),
-- so it ends with the transaction); a query that forgets to filter by shop still sees only the
-- active shop's rows. Sign-in and set-up code that must look across shops sets lapmark.system.
-- FORCE makes the policies apply to the tables' owner too, which is the role the app uses.
CREATE FUNCTION lapmark_current_shop() RETURNS uuid LANGUAGE sql STABLE AS
$$ SELECT nullif(current_setting('lapmark.shop_id', true), '')::uuid $$;
--> statement-breakpoint
CREATE FUNCTION lapmark_system_scope() RETURNS boolean LANGUAGE sql STABLE AS
$$ SELECT coalesce(current_setting('lapmark.system', true), '') = 'on' $$;
--> statement-breakpoint
ALTER TABLE "shops" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "shops" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "shops" USING ((SELECT lapmark_system_scope()) OR id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "memberships" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "memberships" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "memberships" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "families" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "families" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "families" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "limits" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "limits" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "limits" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "heads" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "heads" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "heads" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "cylinder_leakage" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "cylinder_leakage" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "cylinder_leakage" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "decisions" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "decisions" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "decisions" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "instruments" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "instruments" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "instruments" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "import_batches" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "import_batches" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "import_batches" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "import_rejects" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "import_rejects" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "import_rejects" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "readings" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "readings" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "readings" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "api_tokens" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "api_tokens" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "api_tokens" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "audit_log" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "audit_log" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "audit_log" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "invitations" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "invitations" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "invitations" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
