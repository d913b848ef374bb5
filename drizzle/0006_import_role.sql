-- Faster bulk loads into readings. First: the bulk import may COPY new readings straight into
-- readings (src/lib/server/import/run.ts).
-- PostgreSQL refuses COPY FROM into a table under row-level security, so the import switches, for
-- that one statement, to lapmark_import: a role without login that bypasses row-level security and
-- may do nothing but insert readings. scripts/pg.sh creates it (with the cluster's superuser) and
-- lets the app's role switch to it; on a server without it the import stages every row and inserts
-- them with one INSERT … SELECT, as before. What keeps such rows in their shop: the import writes
-- the shop id and its batch id itself (never from the file), the composite foreign keys
-- (shop_id, head_id, family_id) → heads and (shop_id, batch_id) → import_batches tie each row to
-- that shop's head and that shop's batch, and the summary trigger below writes under the shop's
-- row-level security.
DO $$
BEGIN
	IF EXISTS (SELECT 1 FROM pg_roles WHERE rolname = 'lapmark_import') THEN
		GRANT INSERT ON readings TO lapmark_import;
	END IF;
END
$$;
--> statement-breakpoint
-- The import creates the heads a file introduces after streaming its readings (a connection in COPY
-- mode takes no other statement), so it defers this one check to its commit. Every other writer
-- keeps the immediate check.
ALTER TABLE readings ALTER CONSTRAINT readings_head_fk DEFERRABLE INITIALLY IMMEDIATE;
--> statement-breakpoint
-- The summary trigger (0004) runs as the tables' owner, under row-level security, whoever writes
-- readings: lapmark_import needs no rights on the summaries, and a row of another shop than the one
-- the transaction is scoped to fails here. search_path is fixed, with pg_temp last, as a definer's
-- function must have it.
ALTER FUNCTION lapmark_readings_stats() SECURITY DEFINER SET search_path = public, pg_temp;
--> statement-breakpoint
-- readings.series_key is computed by lapmark_series() (0004) for every row written. Declared
-- STRICT, the function could not be inlined (its CASE expressions are not strict), so PostgreSQL
-- ran it as a separate SQL query per row: about a fifth of a bulk load's time. For a null argument
-- its CASE yields null anyway, so the result is the same; inlined, it is a plain expression.
ALTER FUNCTION lapmark_series(measurement, stage, side) CALLED ON NULL INPUT;
