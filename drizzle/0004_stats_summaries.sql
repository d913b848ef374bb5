CREATE TABLE "reading_summaries" (
	"shop_id" uuid NOT NULL,
	"series_key" smallint NOT NULL,
	"family_id" uuid NOT NULL,
	"month" date NOT NULL,
	"n" integer NOT NULL,
	"mean" double precision NOT NULL,
	"m2" double precision NOT NULL,
	"min" double precision NOT NULL,
	"max" double precision NOT NULL,
	CONSTRAINT "reading_summaries_pkey" PRIMARY KEY("shop_id","series_key","family_id","month"),
	CONSTRAINT "reading_summaries_n_positive" CHECK ("reading_summaries"."n" > 0),
	CONSTRAINT "reading_summaries_m2_non_negative" CHECK ("reading_summaries"."m2" >= 0)
);
--> statement-breakpoint
CREATE TABLE "reading_value_counts" (
	"shop_id" uuid NOT NULL,
	"series_key" smallint NOT NULL,
	"family_id" uuid NOT NULL,
	"month" date NOT NULL,
	"value" double precision NOT NULL,
	"n" integer NOT NULL,
	CONSTRAINT "reading_value_counts_pkey" PRIMARY KEY("shop_id","series_key","family_id","month","value"),
	CONSTRAINT "reading_value_counts_n_non_negative" CHECK ("reading_value_counts"."n" >= 0)
);
--> statement-breakpoint
-- measurement × stage × side as one small integer: 4 × (position of the measurement in the
-- enum's declaration) + 2 × (stage = final) + (side = exhaust). $lib/server/db/series.ts computes
-- the same numbers; a database test checks that every combination agrees. Under row-level
-- security only leakproof comparisons may narrow an index scan, and enum equality is not marked
-- leakproof (changing that needs a superuser), so queries filter on this key instead.
CREATE FUNCTION lapmark_series(m measurement, st stage, sd side) RETURNS smallint
LANGUAGE sql IMMUTABLE PARALLEL SAFE STRICT AS $$
	SELECT (4 * CASE m
		WHEN 'stem_diameter' THEN 0
		WHEN 'guide_bore' THEN 1
		WHEN 'clearance' THEN 2
		WHEN 'face_runout' THEN 3
		WHEN 'seat_runout' THEN 4
		WHEN 'seat_width' THEN 5
		WHEN 'margin' THEN 6
		WHEN 'roughness_ra' THEN 7
		WHEN 'vacuum_hold' THEN 8
		WHEN 'fluid_hold' THEN 9
		WHEN 'leakdown' THEN 10
	END + CASE st WHEN 'final' THEN 2 ELSE 0 END + CASE sd WHEN 'exhaust' THEN 1 ELSE 0 END)::smallint
$$;
--> statement-breakpoint
ALTER TABLE "readings" ADD COLUMN "series_key" smallint GENERATED ALWAYS AS (lapmark_series(measurement, stage, side)) STORED NOT NULL;--> statement-breakpoint
-- Covering: value and the valve position ride along, so rates, capability, control charts and the
-- month edges of distributions read this index alone (an index-only scan), not the heap.
CREATE INDEX "readings_series_idx" ON "readings" USING btree ("shop_id","series_key","family_id","measured_at") INCLUDE ("value","head_id","cylinder","valve");
--> statement-breakpoint
-- Room on each page for in-place (HOT) updates: every import and undo rewrites counts.
ALTER TABLE "reading_summaries" SET (fillfactor = 70);
--> statement-breakpoint
ALTER TABLE "reading_value_counts" SET (fillfactor = 70);
--> statement-breakpoint
-- Row-level security, as for every shop-owned table (drizzle/0001).
ALTER TABLE "reading_summaries" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "reading_summaries" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "reading_summaries" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
ALTER TABLE "reading_value_counts" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "reading_value_counts" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "reading_value_counts" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
-- The calendar month (UTC) a reading belongs to, as its first day.
CREATE FUNCTION lapmark_month(ts timestamptz) RETURNS date LANGUAGE sql IMMUTABLE PARALLEL SAFE AS
$$ SELECT date_trunc('month', ts AT TIME ZONE 'UTC')::date $$;
--> statement-breakpoint
-- Keeps reading_summaries and reading_value_counts equal to a full recomputation over readings,
-- for every write path (bulk import, undo, demo seed, hand entry, cascaded deletes), inside the
-- writing transaction. Statement-level, with transition tables: each statement's changed rows are
-- grouped once (by group-month and value), and only the group-months they touch are written.
--   insert: value counts are incremented; the new rows' count, mean and M2 per group-month
--           (corrected two-pass over their value counts) are merged into the stored moments with
--           the pairwise update of Chan, Golub & LeVeque:
--             δ = mean_b − mean_a, n = n_a + n_b, mean = mean_a + δ·n_b/n, M2 = M2_a + M2_b + δ²·n_a·n_b/n.
--   delete: value counts are decremented (exact: they are integers) and emptied rows dropped; the
--           moments of each touched group-month are recomputed from its remaining value counts
--           (corrected two-pass). Subtracting moments instead would cancel catastrophically when
--           most of a group goes, as in an undo.
--   update: a delete of the old rows, then an insert of the new ones.
-- A per-shop advisory lock, held to the end of the transaction, keeps a recomputation from
-- overwriting a concurrent transaction's merge into the same group-month. Writers of readings run
-- at READ COMMITTED (the default), so each statement here sees what the lock's holder committed.
CREATE FUNCTION lapmark_readings_stats() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
	IF TG_OP = 'INSERT' THEN
		PERFORM pg_advisory_xact_lock(7120427, hashtext(s.shop_id::text))
		FROM (SELECT DISTINCT shop_id FROM new_rows ORDER BY shop_id) s;
	ELSIF TG_OP = 'DELETE' THEN
		PERFORM pg_advisory_xact_lock(7120427, hashtext(s.shop_id::text))
		FROM (SELECT DISTINCT shop_id FROM old_rows ORDER BY shop_id) s;
	ELSE
		PERFORM pg_advisory_xact_lock(7120427, hashtext(s.shop_id::text))
		FROM (SELECT shop_id FROM old_rows UNION SELECT shop_id FROM new_rows ORDER BY shop_id) s;
	END IF;

	IF TG_OP IN ('DELETE', 'UPDATE') THEN
		WITH d AS MATERIALIZED (
			SELECT shop_id, series_key, family_id, lapmark_month(measured_at) AS month, value, count(*)::int AS n
			FROM old_rows GROUP BY 1, 2, 3, 4, 5
		), g AS MATERIALIZED (
			SELECT DISTINCT shop_id, series_key, family_id, month FROM d
		), after AS MATERIALIZED (
			-- Every value count of the touched group-months, as it is once these rows are gone
			-- (a union and a hash aggregate: a join on five columns is estimated at one row,
			-- and the nested loop the planner then picks is quadratic).
			SELECT shop_id, series_key, family_id, month, value, sum(n)::int AS n, bool_or(removed) AS touched
			FROM (
				SELECT c.shop_id, c.series_key, c.family_id, c.month, c.value, c.n, false AS removed
				FROM reading_value_counts c
				JOIN g ON c.shop_id = g.shop_id AND c.series_key = g.series_key AND c.family_id = g.family_id AND c.month = g.month
				UNION ALL
				SELECT shop_id, series_key, family_id, month, value, -n, true FROM d
			) u
			GROUP BY 1, 2, 3, 4, 5
		), dropped AS (
			DELETE FROM reading_value_counts c USING after a
			WHERE c.shop_id = a.shop_id AND c.series_key = a.series_key AND c.family_id = a.family_id AND c.month = a.month AND c.value = a.value AND a.touched AND a.n <= 0
		), lowered AS (
			UPDATE reading_value_counts c SET n = a.n FROM after a
			WHERE c.shop_id = a.shop_id AND c.series_key = a.series_key AND c.family_id = a.family_id AND c.month = a.month AND c.value = a.value AND a.touched AND a.n > 0
		), moments AS MATERIALIZED (
			SELECT shop_id, series_key, family_id, month, max(total)::int AS n,
				max(mean0) + sum(n * (value - mean0)) / max(total) AS mean,
				greatest(0, sum(n * (value - mean0) ^ 2) - sum(n * (value - mean0)) ^ 2 / max(total)) AS m2,
				min(value) AS min, max(value) AS max
			FROM (
				SELECT a.*, sum(a.n) OVER w AS total, sum(a.n * a.value) OVER w / sum(a.n) OVER w AS mean0
				FROM after a WHERE a.n > 0
				WINDOW w AS (PARTITION BY shop_id, series_key, family_id, month)
			) x
			GROUP BY shop_id, series_key, family_id, month
		), emptied AS (
			DELETE FROM reading_summaries s
			USING (SELECT shop_id, series_key, family_id, month FROM after GROUP BY 1, 2, 3, 4 HAVING bool_and(n <= 0)) e
			WHERE s.shop_id = e.shop_id AND s.series_key = e.series_key AND s.family_id = e.family_id AND s.month = e.month
		)
		INSERT INTO reading_summaries AS s (shop_id, series_key, family_id, month, n, mean, m2, min, max)
		SELECT shop_id, series_key, family_id, month, n, mean, m2, min, max FROM moments
		ON CONFLICT ON CONSTRAINT reading_summaries_pkey DO UPDATE
			SET n = excluded.n, mean = excluded.mean, m2 = excluded.m2, min = excluded.min, max = excluded.max;
	END IF;

	IF TG_OP IN ('INSERT', 'UPDATE') THEN
		WITH d AS MATERIALIZED (
			SELECT shop_id, series_key, family_id, lapmark_month(measured_at) AS month, value, count(*)::int AS n
			FROM new_rows GROUP BY 1, 2, 3, 4, 5
		), counted AS (
			-- In key order, so a group's rows share heap pages and a read touches few of them.
			INSERT INTO reading_value_counts AS c (shop_id, series_key, family_id, month, value, n)
			SELECT shop_id, series_key, family_id, month, value, n FROM d ORDER BY 1, 2, 3, 4, 5
			ON CONFLICT ON CONSTRAINT reading_value_counts_pkey DO UPDATE SET n = c.n + excluded.n
		), b AS (
			-- Count, mean and M2 of the new rows per group-month.
			SELECT shop_id, series_key, family_id, month, max(total)::int AS n,
				max(mean0) + sum(n * (value - mean0)) / max(total) AS mean,
				greatest(0, sum(n * (value - mean0) ^ 2) - sum(n * (value - mean0)) ^ 2 / max(total)) AS m2,
				min(value) AS min, max(value) AS max
			FROM (
				SELECT d.*, sum(d.n) OVER w AS total, sum(d.n * d.value) OVER w / sum(d.n) OVER w AS mean0
				FROM d WINDOW w AS (PARTITION BY shop_id, series_key, family_id, month)
			) x
			GROUP BY shop_id, series_key, family_id, month
		)
		INSERT INTO reading_summaries AS s (shop_id, series_key, family_id, month, n, mean, m2, min, max)
		SELECT shop_id, series_key, family_id, month, n, mean, m2, min, max FROM b ORDER BY 1, 2, 3, 4
		ON CONFLICT ON CONSTRAINT reading_summaries_pkey DO UPDATE SET
			n = s.n + excluded.n,
			mean = s.mean + (excluded.mean - s.mean) * (excluded.n::float8 / (s.n + excluded.n)),
			m2 = s.m2 + excluded.m2 + (excluded.mean - s.mean) ^ 2 * (s.n::float8 * excluded.n / (s.n + excluded.n)),
			min = least(s.min, excluded.min),
			max = greatest(s.max, excluded.max);
	END IF;
	RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER readings_stats_insert AFTER INSERT ON readings
	REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_readings_stats();
--> statement-breakpoint
CREATE TRIGGER readings_stats_delete AFTER DELETE ON readings
	REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_readings_stats();
--> statement-breakpoint
CREATE TRIGGER readings_stats_update AFTER UPDATE ON readings
	REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_readings_stats();
--> statement-breakpoint
CREATE FUNCTION lapmark_readings_stats_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
	TRUNCATE reading_summaries, reading_value_counts;
	RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER readings_stats_truncate AFTER TRUNCATE ON readings
	FOR EACH STATEMENT EXECUTE FUNCTION lapmark_readings_stats_truncate();
--> statement-breakpoint
-- Readings stored before this migration: summarised once, across shops.
SELECT set_config('lapmark.system', 'on', true);
--> statement-breakpoint
INSERT INTO reading_value_counts (shop_id, series_key, family_id, month, value, n)
SELECT shop_id, series_key, family_id, lapmark_month(measured_at), value, count(*)::int
FROM readings GROUP BY 1, 2, 3, 4, 5 ORDER BY 1, 2, 3, 4, 5;
--> statement-breakpoint
INSERT INTO reading_summaries (shop_id, series_key, family_id, month, n, mean, m2, min, max)
SELECT shop_id, series_key, family_id, lapmark_month(measured_at), count(*)::int, avg(value), var_pop(value) * count(*), min(value), max(value)
FROM readings GROUP BY 1, 2, 3, 4 ORDER BY 1, 2, 3, 4;
--> statement-breakpoint
SELECT set_config('lapmark.system', '', true);
