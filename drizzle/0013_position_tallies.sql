CREATE TABLE "reading_position_tallies" (
	"shop_id" uuid NOT NULL,
	"series_key" smallint NOT NULL,
	"family_id" uuid NOT NULL,
	"month" date NOT NULL,
	"cylinder" smallint NOT NULL,
	"prev_month" date NOT NULL,
	"checked" integer NOT NULL,
	"failed" integer NOT NULL,
	CONSTRAINT "reading_position_tallies_pkey" PRIMARY KEY("shop_id","series_key","family_id","month","cylinder","prev_month"),
	CONSTRAINT "reading_position_tallies_counts" CHECK ("reading_position_tallies"."checked" >= 0 and "reading_position_tallies"."failed" >= 0 and "reading_position_tallies"."checked" + "reading_position_tallies"."failed" > 0)
);
--> statement-breakpoint
-- hand-written below
-- Room on each page for in-place (HOT) updates, as for the other summaries (0004).
ALTER TABLE "reading_position_tallies" SET (fillfactor = 70);
--> statement-breakpoint
ALTER TABLE "reading_position_tallies" ENABLE ROW LEVEL SECURITY;
--> statement-breakpoint
ALTER TABLE "reading_position_tallies" FORCE ROW LEVEL SECURITY;
--> statement-breakpoint
CREATE POLICY shop_scope ON "reading_position_tallies" USING ((SELECT lapmark_system_scope()) OR shop_id = (SELECT lapmark_current_shop()));
--> statement-breakpoint
-- reading_position_tallies (schema/rates.ts) holds, per shop × series × family × month ×
-- cylinder, the valve positions judged against the limits of their readings' days and the ones
-- with a reading outside them, as the rates route defines them (queries/stats/rates.ts): a
-- position is head × cylinder × side × valve; it is judged in a month when it has a reading of
-- the series in that month with a limit version in force on the reading's day (UTC); it fails in
-- that month when one of those readings is outside its own day's limits. Each position enters
-- once per month it was judged in, with the previous month it was judged in (prev_month,
-- '-infinity' for the first), and once per month it failed in, with the previous month it failed
-- in; so the positions judged over any run of whole months [a, b) are the entries with
-- a <= month < b and prev_month < a, one per position, and months pool exactly.
--
-- The statement below changes the table by the difference between two states of some positions:
-- `src` lists readings with a sign, +1 for the state after a write and -1 for the state before
-- it. Each state's positions are judged, their months chained (lag over the months in order, and
-- the latest earlier failing month), and the entries of the two states subtracted; unchanged
-- positions cancel. The caller's `src` is CTE text ending with one named src (sign, shop_id,
-- head_id, family_id, series_key, cylinder, valve, measured_at, value); it may use lv, each
-- family × series' limit versions as arrays in effective order, matched to a reading's instant
-- by width_bucket exactly as measurementTallies does (bucket 0: before the first version).
CREATE FUNCTION lapmark_position_tallies_sql(src text) RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $f$
SELECT format($q$
	WITH lv AS MATERIALIZED (
		SELECT shop_id, family_id, lapmark_series(measurement, stage, side) AS series_key,
			array_agg((effective_from::timestamp AT TIME ZONE 'UTC') ORDER BY effective_from) AS starts,
			array_agg(coalesce(min, '-Infinity') ORDER BY effective_from) AS mins,
			array_agg(coalesce(max, 'Infinity') ORDER BY effective_from) AS maxs
		FROM limits GROUP BY 1, 2, 3
	), %s,
	judged AS (
		SELECT sign, shop_id, head_id, family_id, series_key, cylinder, valve, lapmark_month(measured_at) AS month,
			value < mins[version] OR value > maxs[version] AS outside
		FROM (
			SELECT s.*, lv.mins, lv.maxs, width_bucket(s.measured_at, lv.starts) AS version
			FROM src s JOIN lv ON lv.shop_id = s.shop_id AND lv.family_id = s.family_id AND lv.series_key = s.series_key
		) x
		WHERE version > 0
	), pm AS (
		SELECT sign, shop_id, head_id, family_id, series_key, cylinder, valve, month, bool_or(outside) AS failed
		-- The head first: the sort settles most comparisons on it, and its order serves the window below.
		FROM judged GROUP BY head_id, series_key, cylinder, valve, sign, shop_id, family_id, month
	), chained AS (
		SELECT sign, shop_id, series_key, family_id, cylinder, month, failed,
			coalesce(lag(month) OVER w, '-infinity') AS prev_judged,
			coalesce(max(month) FILTER (WHERE failed) OVER (w ROWS BETWEEN UNBOUNDED PRECEDING AND 1 PRECEDING), '-infinity') AS prev_failed
		FROM pm
		WINDOW w AS (PARTITION BY head_id, series_key, cylinder, valve, sign, shop_id, family_id ORDER BY month)
	), d AS MATERIALIZED (
		SELECT shop_id, series_key, family_id, month, cylinder, prev_month, sum(checked)::int AS checked, sum(failed)::int AS failed
		FROM (
			SELECT shop_id, series_key, family_id, month, cylinder, prev_judged AS prev_month, sign AS checked, 0 AS failed FROM chained
			UNION ALL
			SELECT shop_id, series_key, family_id, month, cylinder, prev_failed, 0, sign FROM chained WHERE failed
		) e
		GROUP BY 1, 2, 3, 4, 5, 6
		HAVING sum(checked) <> 0 OR sum(failed) <> 0
	), m AS MATERIALIZED (
		SELECT d.shop_id, d.series_key, d.family_id, d.month, d.cylinder, d.prev_month,
			coalesce(t.checked, 0) + d.checked AS checked, coalesce(t.failed, 0) + d.failed AS failed, t.shop_id IS NOT NULL AS stored
		FROM d LEFT JOIN reading_position_tallies t
			ON t.shop_id = d.shop_id AND t.series_key = d.series_key AND t.family_id = d.family_id
			AND t.month = d.month AND t.cylinder = d.cylinder AND t.prev_month = d.prev_month
	), dropped AS (
		DELETE FROM reading_position_tallies t USING m
		WHERE m.stored AND m.checked = 0 AND m.failed = 0
			AND t.shop_id = m.shop_id AND t.series_key = m.series_key AND t.family_id = m.family_id
			AND t.month = m.month AND t.cylinder = m.cylinder AND t.prev_month = m.prev_month
	), changed AS (
		UPDATE reading_position_tallies t SET checked = m.checked, failed = m.failed FROM m
		WHERE m.stored AND (m.checked <> 0 OR m.failed <> 0)
			AND t.shop_id = m.shop_id AND t.series_key = m.series_key AND t.family_id = m.family_id
			AND t.month = m.month AND t.cylinder = m.cylinder AND t.prev_month = m.prev_month
	)
	INSERT INTO reading_position_tallies (shop_id, series_key, family_id, month, cylinder, prev_month, checked, failed)
	SELECT shop_id, series_key, family_id, month, cylinder, prev_month, checked, failed FROM m
	WHERE NOT m.stored ORDER BY 1, 2, 3, 4, 5, 6
$q$, src)
$f$;
--> statement-breakpoint
-- The rows of a statement-level trigger's transition tables (new_rows, old_rows, both for an
-- update), as query text for EXECUTE in the trigger function, which sees them.
CREATE FUNCTION lapmark_transition_rows(op text, cols text) RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
	SELECT CASE op
		WHEN 'INSERT' THEN format('SELECT %s FROM new_rows', cols)
		WHEN 'DELETE' THEN format('SELECT %s FROM old_rows', cols)
		ELSE format('SELECT %1$s FROM new_rows UNION ALL SELECT %1$s FROM old_rows', cols)
	END
$$;
--> statement-breakpoint
-- The per-shop advisory lock of the summary triggers (0004), for the shops of `rows` (query text
-- with a shop_id column), taken in shop order.
CREATE FUNCTION lapmark_lock_shops_sql(rows text) RETURNS text LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $$
	SELECT format('SELECT pg_advisory_xact_lock(7120427, hashtext(s.shop_id::text)) FROM (SELECT DISTINCT shop_id FROM (%s) w ORDER BY shop_id) s', rows)
$$;
--> statement-breakpoint
-- After every statement on readings: the positions of every head the statement touched, in the
-- series it touched, all their readings as they are now (+1) and as they were before it (-1: now,
-- less the statement's new rows, plus its old ones); positions the statement left alone cancel. The heads' readings
-- are found through readings_identity_key (head_id leads it, and uuid equality may narrow an
-- index scan under row-level security), by an array, so the plan does not hang on an estimate
-- of the transition table (a join on (shop, series) once read every reading of the series per
-- head). The same per-shop advisory lock as lapmark_readings_stats
-- (0004), taken first because this trigger fires first (triggers fire in name order), keeps
-- concurrent writers of one shop from merging into the same rows from stale pictures. Runs as
-- the tables' owner under row-level security, like the other summaries (0006), and ALWAYS (0007).
CREATE FUNCTION lapmark_readings_rates() RETURNS trigger LANGUAGE plpgsql
SECURITY DEFINER SET search_path = public, pg_temp AS $$
DECLARE
	cols constant text := 'shop_id, head_id, family_id, series_key, cylinder, valve, measured_at, value';
	touched text;
	src text;
BEGIN
	touched := lapmark_transition_rows(TG_OP, 'shop_id, head_id, series_key');
	EXECUTE lapmark_lock_shops_sql(touched);
	src := format($s$
		cur AS MATERIALIZED (
			SELECT r.id, r.shop_id, r.head_id, r.family_id, r.series_key, r.cylinder, r.valve, r.measured_at, r.value
			FROM readings r WHERE r.head_id = ANY (ARRAY(SELECT DISTINCT head_id FROM (%1$s) w))
				AND r.series_key = ANY (ARRAY(SELECT DISTINCT series_key FROM (%1$s) w))
		), src AS (
			SELECT 1 AS sign, %2$s FROM cur
			UNION ALL
			SELECT -1, %2$s FROM cur c
	$s$, touched, cols);
	IF TG_OP = 'DELETE' THEN
		src := src || format(' UNION ALL SELECT -1, %s FROM old_rows)', cols);
	ELSE
		src := src || ' WHERE NOT EXISTS (SELECT 1 FROM new_rows n WHERE n.id = c.id)';
		IF TG_OP = 'UPDATE' THEN
			src := src || format(' UNION ALL SELECT -1, %s FROM old_rows', cols);
		END IF;
		src := src || ')';
	END IF;
	EXECUTE lapmark_position_tallies_sql(src);
	RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER readings_rates_insert AFTER INSERT ON readings
	REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_readings_rates();
--> statement-breakpoint
CREATE TRIGGER readings_rates_delete AFTER DELETE ON readings
	REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_readings_rates();
--> statement-breakpoint
CREATE TRIGGER readings_rates_update AFTER UPDATE ON readings
	REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_readings_rates();
--> statement-breakpoint
-- After every statement on limits: each family × series whose versions it inserted, changed or
-- deleted is judged again from its readings (its rows dropped, then recomputed as one state).
CREATE FUNCTION lapmark_limits_rates() RETURNS trigger LANGUAGE plpgsql
SECURITY DEFINER SET search_path = public, pg_temp AS $$
DECLARE
	changed text;
BEGIN
	changed := lapmark_transition_rows(TG_OP, 'shop_id, family_id, lapmark_series(measurement, stage, side) AS series_key');
	EXECUTE lapmark_lock_shops_sql(changed);
	EXECUTE format('DELETE FROM reading_position_tallies t USING (%s) a
		WHERE t.shop_id = a.shop_id AND t.series_key = a.series_key AND t.family_id = a.family_id', changed);
	EXECUTE lapmark_position_tallies_sql(format($s$
		a AS MATERIALIZED (SELECT DISTINCT * FROM (%s) c),
		src AS (
			SELECT 1 AS sign, r.shop_id, r.head_id, r.family_id, r.series_key, r.cylinder, r.valve, r.measured_at, r.value
			FROM readings r JOIN a ON r.shop_id = a.shop_id AND r.series_key = a.series_key AND r.family_id = a.family_id
		)$s$, changed));
	RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER limits_rates_insert AFTER INSERT ON limits
	REFERENCING NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_limits_rates();
--> statement-breakpoint
CREATE TRIGGER limits_rates_delete AFTER DELETE ON limits
	REFERENCING OLD TABLE AS old_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_limits_rates();
--> statement-breakpoint
CREATE TRIGGER limits_rates_update AFTER UPDATE ON limits
	REFERENCING OLD TABLE AS old_rows NEW TABLE AS new_rows FOR EACH STATEMENT EXECUTE FUNCTION lapmark_limits_rates();
--> statement-breakpoint
CREATE FUNCTION lapmark_rates_truncate() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
	TRUNCATE reading_position_tallies;
	RETURN NULL;
END
$$;
--> statement-breakpoint
CREATE TRIGGER readings_rates_truncate AFTER TRUNCATE ON readings
	FOR EACH STATEMENT EXECUTE FUNCTION lapmark_rates_truncate();
--> statement-breakpoint
CREATE TRIGGER limits_rates_truncate AFTER TRUNCATE ON limits
	FOR EACH STATEMENT EXECUTE FUNCTION lapmark_rates_truncate();
--> statement-breakpoint
-- In replica mode (the import's direct COPY, 0007) only ALWAYS triggers fire.
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_rates_insert;
--> statement-breakpoint
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_rates_delete;
--> statement-breakpoint
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_rates_update;
--> statement-breakpoint
ALTER TABLE readings ENABLE ALWAYS TRIGGER readings_rates_truncate;
--> statement-breakpoint
ALTER TABLE limits ENABLE ALWAYS TRIGGER limits_rates_insert;
--> statement-breakpoint
ALTER TABLE limits ENABLE ALWAYS TRIGGER limits_rates_delete;
--> statement-breakpoint
ALTER TABLE limits ENABLE ALWAYS TRIGGER limits_rates_update;
--> statement-breakpoint
ALTER TABLE limits ENABLE ALWAYS TRIGGER limits_rates_truncate;
--> statement-breakpoint
-- Readings stored before this migration: tallied once, across shops, as one state.
DO $$
BEGIN
	PERFORM set_config('lapmark.system', 'on', true);
	EXECUTE lapmark_position_tallies_sql(
		'src AS (SELECT 1 AS sign, shop_id, head_id, family_id, series_key, cylinder, valve, measured_at, value FROM readings)');
	PERFORM set_config('lapmark.system', '', true);
END
$$;
