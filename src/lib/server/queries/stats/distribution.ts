// Distributions (count, moments, quantiles, fences, histograms) from the per-month summaries the
// readings triggers maintain (reading_summaries, reading_value_counts), for every whole month in
// the date range; the partial months at either end, and any filter the summaries cannot answer
// (machinist, customer, mileage), read readings themselves. Without dates: the all-time
// frequency tables (reading_value_totals).
import { sql, type SQL } from 'drizzle-orm';
import type { DataSource } from '../../../contract';
import type { Conn } from '../../db/scope';
import { expandCounts, mergeMoments, momentsOf, type Moments, type ValueCount } from '../../stats';
import { needsReadings, readingsWhere, type Selection } from './selection';
import { splitWindow, type DayRange } from './window';

/** One family × series of the selection: its moments and its exact frequency table. */
export interface GroupData {
	familyId: string;
	key: number;
	moments: Moments;
	/** Sorted by value. */
	counts: ValueCount[];
}

export type { DataSource };

type CountRow = {
	familyId: string;
	key: number;
	value: number;
	n: number;
};
type MomentRow = {
	familyId: string;
	key: number;
	n: number;
	mean: number;
	m2: number;
	min: number;
	max: number;
};

/**
 * Moments and frequency tables of every family × series in the selection. `source: 'readings'`
 * ignores the summaries (the tests compare both ways); `moments: false` leaves the moments empty
 * when only the frequency tables are needed.
 */
export async function groupData(
	conn: Conn,
	shopId: string,
	sel: Selection,
	opts: { source?: 'auto' | 'readings'; moments?: boolean } = {}
): Promise<{ groups: GroupData[]; source: DataSource }> {
	const acc = new Map<string, { familyId: string; key: number; moments: Moments | null; counts: Map<number, number>; edge: Map<number, number> }>();
	const slot = (familyId: string, key: number) => {
		const id = `${familyId}|${key}`;
		let s = acc.get(id);
		if (!s) acc.set(id, (s = { familyId, key, moments: null, counts: new Map(), edge: new Map() }));
		return s;
	};
	const fromReadings = async (ranges?: DayRange[]) => {
		const rows = await conn.execute<CountRow>(sql`
			select r.family_id as "familyId", r.series_key as key, r.value, count(*)::int as n
			from readings r where ${readingsWhere(shopId, sel, ranges)}
			group by 1, 2, 3`);
		for (const r of rows) {
			const s = slot(r.familyId, r.key);
			s.counts.set(r.value, (s.counts.get(r.value) ?? 0) + r.n);
			s.edge.set(r.value, (s.edge.get(r.value) ?? 0) + r.n);
		}
	};

	let source: DataSource;
	if (opts.source === 'readings' || needsReadings(sel)) {
		source = 'readings';
		await fromReadings();
	} else {
		const win = splitWindow(sel.from, sel.to);
		source = win.edges.length ? (win.months ? 'summaries+readings' : 'readings') : 'summaries';
		if (win.months) {
			const where: SQL[] = [sql`shop_id = ${shopId}`, sql`series_key = any(${sql.param(sel.keys)}::int2[])`];
			if (sel.familyIds) where.push(sql`family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
			if (win.months.start) where.push(sql`month >= ${win.months.start}::date`);
			if (win.months.end) where.push(sql`month < ${win.months.end}::date`);
			const cond = sql.join(where, sql` and `);
			if (win.months.start === null && win.months.end === null) {
				// No dates at all: the all-time frequency tables, a row per value rather than one per
				// value and month. Counts are exact, so the moments come from them too (two-pass, below)
				// and the per-month moments are not read.
				const counts = await conn.execute<CountRow>(sql`
					select family_id as "familyId", series_key as key, value, n
					from reading_value_totals where ${cond}`);
				for (const c of counts) {
					const s = slot(c.familyId, c.key);
					s.counts.set(c.value, c.n);
					s.edge.set(c.value, c.n);
				}
			} else {
				const [moments, counts] = await Promise.all([
					opts.moments === false
						? ([] as MomentRow[])
						: conn.execute<MomentRow>(sql`
								select family_id as "familyId", series_key as key, n, mean, m2, min, max
								from reading_summaries where ${cond}`),
					conn.execute<CountRow>(sql`
						select family_id as "familyId", series_key as key, value, sum(n)::int as n
						from reading_value_counts where ${cond}
						group by 1, 2, 3`)
				]);
				for (const m of moments) {
					const s = slot(m.familyId, m.key);
					const part: Moments = { n: m.n, mean: m.mean, m2: m.m2, min: m.min, max: m.max };
					s.moments = s.moments ? mergeMoments(s.moments, part) : part;
				}
				for (const c of counts) slot(c.familyId, c.key).counts.set(c.value, c.n);
			}
		}
		if (win.edges.length) await fromReadings(win.edges);
	}

	const groups: GroupData[] = [];
	for (const s of acc.values()) {
		const counts = [...s.counts].filter(([, n]) => n > 0).sort((a, b) => a[0] - b[0]) as ValueCount[];
		// Counts read whole (readings read directly, the edges of a date range, or the all-time
		// tables): their moments by the two-pass formula, merged into any stored ones (Chan et al.).
		const edge = s.edge.size && opts.moments !== false ? momentsOf(expandCounts([...s.edge].sort((a, b) => a[0] - b[0]))) : null;
		const moments = s.moments && edge ? mergeMoments(s.moments, edge) : (s.moments ?? edge ?? momentsOf([]));
		groups.push({ familyId: s.familyId, key: s.key, moments, counts });
	}
	groups.sort((a, b) => (a.familyId < b.familyId ? -1 : a.familyId > b.familyId ? 1 : a.key - b.key));
	return { groups, source };
}

// ---------------------------------------------------------------------------------------------
// Readings outside the limits of their day

/** One limit version of a family × series. */
export type LimitVersion = {
	familyId: string;
	key: number;
	min: number | null;
	max: number | null;
	effectiveFrom: string;
};

/** Every limit version of the selection's families × series, in effective order. */
export async function limitVersions(conn: Conn, shopId: string, only: { familyIds: string[] | null; keys: number[] }): Promise<LimitVersion[]> {
	const where: SQL[] = [sql`shop_id = ${shopId}`, sql`lapmark_series(measurement, stage, side) = any(${sql.param(only.keys)}::int2[])`];
	if (only.familyIds) where.push(sql`family_id = any(${sql.param(only.familyIds)}::uuid[])`);
	return conn.execute<LimitVersion>(sql`
		select family_id as "familyId", lapmark_series(measurement, stage, side) as key, min, max, effective_from::text as "effectiveFrom"
		from limits where ${sql.join(where, sql` and `)}
		order by family_id, key, effective_from`);
}

/** Readings of one family × series judged against the limits of their own day. */
export type JudgedRow = {
	familyId: string;
	key: number;
	/** Readings measured on a day some limit version was in force. */
	judged: number;
	below: number;
	above: number;
};

/**
 * Readings of the selection outside the limit version in force on the day (UTC) each was
 * measured, per family × series: the trade's failure question, the one the rates answer asks of
 * valve positions. Every whole month that lies inside one version is judged from the per-month
 * frequency tables (reading_value_counts); a month in which a version starts (rare: a shop
 * changes its limits now and then), the partial months at either end of a date range and the
 * filters the summaries do not keep read readings, each reading meeting its version by time.
 * One statement, versions included, so it runs beside the distribution's own queries.
 * `splitReadings`: how many of the readings judged were read because a version starts in their
 * month (the answer then came partly from readings).
 */
export async function outsideByDay(
	conn: Conn,
	shopId: string,
	sel: Selection,
	opts: { source?: 'auto' | 'readings' } = {}
): Promise<{ rows: JudgedRow[]; splitReadings: number }> {
	const only: SQL[] = [sql`shop_id = ${shopId}`, sql`lapmark_series(measurement, stage, side) = any(${sql.param(sel.keys)}::int2[])`];
	if (sel.familyIds) only.push(sql`family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
	// Each version from its first day to the next one's (open: infinity), missing bounds ±Infinity.
	const lv = sql`
		select family_id, lapmark_series(measurement, stage, side) as series_key,
			coalesce(min, '-Infinity') as lo, coalesce(max, 'Infinity') as hi, effective_from as vfrom,
			coalesce(lead(effective_from) over (partition by family_id, measurement, stage, side order by effective_from), 'infinity') as vto
		from limits where ${sql.join(only, sql` and `)}`;
	const judge = (split: boolean) => sql`count(*) as judged, ${split ? sql`count(*)` : sql`0`} as split,
			count(*) filter (where r.value < lv.lo) as below, count(*) filter (where r.value > lv.hi) as above`;
	const ofItsDay = sql`lv.family_id = r.family_id and lv.series_key = r.series_key
			and r.measured_at >= (lv.vfrom::timestamp at time zone 'UTC') and r.measured_at < (lv.vto::timestamp at time zone 'UTC')`;
	const fromReadings = (where: SQL) => sql`
		select r.family_id, r.series_key, ${judge(false)}
		from readings r join lv on ${ofItsDay}
		where ${where}
		group by 1, 2`;
	const parts: SQL[] = [];
	if (opts.source === 'readings' || needsReadings(sel)) {
		parts.push(fromReadings(readingsWhere(shopId, sel)));
	} else {
		const win = splitWindow(sel.from, sel.to);
		if (win.months) {
			const where: SQL[] = [sql`c.shop_id = ${shopId}`, sql`c.series_key = any(${sql.param(sel.keys)}::int2[])`];
			const inWindow: SQL[] = [sql`true`];
			if (sel.familyIds) where.push(sql`c.family_id = any(${sql.param(sel.familyIds)}::uuid[])`);
			if (win.months.start) {
				where.push(sql`c.month >= ${win.months.start}::date`);
				inWindow.push(sql`m >= ${win.months.start}::date`);
			}
			if (win.months.end) {
				where.push(sql`c.month < ${win.months.end}::date`);
				inWindow.push(sql`m < ${win.months.end}::date`);
			}
			// A month wholly inside one version: its frequency table judged by that version.
			parts.push(sql`
				select c.family_id, c.series_key, sum(c.n) as judged, 0 as split,
					coalesce(sum(c.n) filter (where c.value < lv.lo), 0) as below, coalesce(sum(c.n) filter (where c.value > lv.hi), 0) as above
				from reading_value_counts c
				join lv on lv.family_id = c.family_id and lv.series_key = c.series_key
					and c.month >= lv.vfrom and (c.month + interval '1 month') <= lv.vto
				where ${sql.join(where, sql` and `)}
				group by 1, 2`);
			// A month a version starts in (not on its 1st), within the window: that family × series'
			// readings of the month, each judged by the version of its day.
			parts.push(sql`
				select r.family_id, r.series_key, ${judge(true)}
				from (
					select distinct family_id, series_key, m from (select family_id, series_key, date_trunc('month', vfrom)::date as m from lv where extract(day from vfrom) > 1) v
					where ${sql.join(inWindow, sql` and `)}
				) split
				join readings r on r.shop_id = ${shopId} and r.family_id = split.family_id and r.series_key = split.series_key
					and r.measured_at >= (split.m::timestamp at time zone 'UTC') and r.measured_at < ((split.m + interval '1 month')::timestamp at time zone 'UTC')
				join lv on ${ofItsDay}
				where ${readingsWhere(shopId, sel)}
				group by 1, 2`);
		}
		if (win.edges.length) parts.push(fromReadings(readingsWhere(shopId, sel, win.edges)));
	}
	if (!parts.length) return { rows: [], splitReadings: 0 };
	const rows = await conn.execute<JudgedRow & { split: number }>(sql`
		with lv as (${lv})
		select family_id as "familyId", series_key as key, sum(judged)::int as judged, sum(below)::int as below, sum(above)::int as above,
			sum(split)::int as split
		from (${sql.join(parts, sql` union all `)}) j
		group by 1, 2`);
	return {
		rows: rows.map(({ split: _s, ...r }) => r),
		splitReadings: rows.reduce((n, r) => n + r.split, 0)
	};
}
