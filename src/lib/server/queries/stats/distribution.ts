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
