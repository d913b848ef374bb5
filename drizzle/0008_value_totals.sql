CREATE TABLE "reading_value_totals" (
	"shop_id" uuid NOT NULL,
	"series_key" smallint NOT NULL,
	"family_id" uuid NOT NULL,
	"value" double precision NOT NULL,
	"n" integer NOT NULL,
	CONSTRAINT "reading_value_totals_pkey" PRIMARY KEY("shop_id","series_key","family_id","value"),
	CONSTRAINT "reading_value_totals_n_positive" CHECK ("reading_value_totals"."n" > 0)
);
--> statement-breakpoint
-- Room on each page for in-place (HOT) updates, as for the per-month tables (0004).
ALTER TABLE "reading_value_totals" SET (fillfactor = 70);
--> statement-breakpoint
ALTER TABLE "reading_value_totals" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "reading_value_totals" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "reading_value_totals" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
-- The readings triggers (0004, 0006) keep reading_value_totals too: the frequency table of every
-- shop × series × family over all time, which a selection without dates reads instead of adding up
-- every month's table (a row per value rather than per value and month). Otherwise unchanged.
CREATE OR REPLACE FUNCTION lapmark_readings_stats() RETURNS trigger LANGUAGE plpgsql
SECURITY DEFINER SET search_path = public, pg_temp AS $$
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

		-- All-time value counts: lowered, and dropped when they reach zero (the rows updated and
		-- the rows deleted are disjoint, so one statement does both).
		WITH d AS MATERIALIZED (
			SELECT shop_id, series_key, family_id, value, count(*)::int AS n
			FROM old_rows GROUP BY 1, 2, 3, 4
		), after AS MATERIALIZED (
			SELECT t.shop_id, t.series_key, t.family_id, t.value, t.n - d.n AS n
			FROM reading_value_totals t
			JOIN d ON t.shop_id = d.shop_id AND t.series_key = d.series_key AND t.family_id = d.family_id AND t.value = d.value
		), dropped AS (
			DELETE FROM reading_value_totals t USING after a
			WHERE t.shop_id = a.shop_id AND t.series_key = a.series_key AND t.family_id = a.family_id AND t.value = a.value AND a.n <= 0
		)
		UPDATE reading_value_totals t SET n = a.n FROM after a
		WHERE t.shop_id = a.shop_id AND t.series_key = a.series_key AND t.family_id = a.family_id AND t.value = a.value AND a.n > 0;
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
		), totalled AS (
			INSERT INTO reading_value_totals AS t (shop_id, series_key, family_id, value, n)
			SELECT shop_id, series_key, family_id, value, sum(n)::int FROM d GROUP BY 1, 2, 3, 4 ORDER BY 1, 2, 3, 4
			ON CONFLICT ON CONSTRAINT reading_value_totals_pkey DO UPDATE SET n = t.n + excluded.n
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
CREATE OR REPLACE FUNCTION lapmark_readings_stats_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
	TRUNCATE reading_summaries, reading_value_counts, reading_value_totals;
	RETURN NULL;
END
$$;
--> statement-breakpoint
-- Readings stored before this migration: their all-time counts from the per-month ones.
DO $$
BEGIN
	PERFORM set_config('lapmark.system', 'on', true);
	INSERT INTO reading_value_totals (shop_id, series_key, family_id, value, n)
	SELECT shop_id, series_key, family_id, value, sum(n)::int FROM reading_value_counts
	GROUP BY 1, 2, 3, 4 HAVING sum(n) > 0 ORDER BY 1, 2, 3, 4;
	PERFORM set_config('lapmark.system', '', true);
END
$$;
