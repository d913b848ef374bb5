// The per-month summaries the readings triggers keep (drizzle/0004_stats_summaries.sql, and the
// all-time value counts of 0008) must equal
// a full recomputation over readings after every kind of write: a bulk import, its undo, plain
// inserts of one and of many rows, updates that move a reading to another value, month or family
// series, deletes, and a head's cascaded delete. The recomputation here is the textbook SQL
// (count, avg, var_pop, min, max; count per value), independent of the triggers' own arithmetic.
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MEASUREMENTS, SIDES, STAGES } from '../../src/lib/measurements';
import { withShop } from '../../src/lib/server/db/scope';
import { heads, readings } from '../../src/lib/server/db/schema';
import { seriesKey, seriesKeys } from '../../src/lib/server/db/series';
import { undoBatch } from '../../src/lib/server/queries/imports';
import { groupData, type Selection } from '../../src/lib/server/queries/stats';
import { importEachWay, makeShop, raw, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;
let familyId: string;

type Row = Record<string, unknown>;

async function summaries() {
	return withShop(db, shopId, async (tx) => ({
		moments: (await tx.execute<Row>(raw`
			select series_key, family_id, month::text, n, mean, m2, min, max from reading_summaries
			where shop_id = ${shopId} order by 1, 2, 3`)) as Row[],
		counts: (await tx.execute<Row>(raw`
			select series_key, family_id, month::text, value, n from reading_value_counts
			where shop_id = ${shopId} order by 1, 2, 3, 4`)) as Row[],
		totals: (await tx.execute<Row>(raw`
			select series_key, family_id, value, n from reading_value_totals
			where shop_id = ${shopId} order by 1, 2, 3`)) as Row[]
	}));
}

async function recomputed() {
	return withShop(db, shopId, async (tx) => ({
		moments: (await tx.execute<Row>(raw`
			select series_key, family_id, date_trunc('month', measured_at at time zone 'UTC')::date::text as month,
				count(*)::int as n, avg(value) as mean, var_pop(value) * count(*) as m2, min(value) as min, max(value) as max
			from readings where shop_id = ${shopId} group by 1, 2, 3 order by 1, 2, 3`)) as Row[],
		counts: (await tx.execute<Row>(raw`
			select series_key, family_id, date_trunc('month', measured_at at time zone 'UTC')::date::text as month, value, count(*)::int as n
			from readings where shop_id = ${shopId} group by 1, 2, 3, 4 order by 1, 2, 3, 4`)) as Row[],
		totals: (await tx.execute<Row>(raw`
			select series_key, family_id, value, count(*)::int as n
			from readings where shop_id = ${shopId} group by 1, 2, 3 order by 1, 2, 3`)) as Row[]
	}));
}

/**
 * Summaries equal the recomputation: counts, n, min and max exactly; mean to 1e-12 and M2 to 1e-10
 * relative. Both sides round differently (PostgreSQL's var_pop is Youngs–Cramer; the triggers use
 * two-pass sums and Chan merges); the textbook Σx² − n·x̄² would miss by ~1e-7 on the NumAcc-style
 * data below.
 */
async function expectConsistent() {
	const [got, want] = await Promise.all([summaries(), recomputed()]);
	expect(got.counts).toEqual(want.counts);
	expect(got.totals).toEqual(want.totals);
	expect(got.moments.map(({ mean: _a, m2: _b, ...k }) => k)).toEqual(want.moments.map(({ mean: _a, m2: _b, ...k }) => k));
	got.moments.forEach((g, i) => {
		const w = want.moments[i];
		expect(Math.abs((g.mean as number) - (w.mean as number))).toBeLessThanOrEqual(1e-12 * Math.abs(w.mean as number));
		expect(Math.abs((g.m2 as number) - (w.m2 as number))).toBeLessThanOrEqual(1e-10 * Math.max(1e-12, w.m2 as number) + 1e-18);
	});
	return got;
}

let headSeq = 0;
async function newHead(received = '2026-01-05') {
	const [h] = await withShop(db, shopId, (tx) =>
		tx.insert(heads).values({ shopId, familyId, serial: `SUM-${++headSeq}`, receivedOn: received, mileageKm: 100_000 + headSeq }).returning()
	);
	return h.id;
}

/** A deterministic spread of quantised readings across three months, both sides and stages. */
function spread(headId: string, count: number, seed: number) {
	const rows = [];
	let x = seed;
	const next = () => (x = (x * 1103515245 + 12345) % 2147483648) / 2147483648;
	const times = ['2026-01-31T23:59:59Z', '2026-02-01T00:00:00Z', '2026-02-14T10:00:00Z', '2026-03-01T00:00:00Z', '2026-03-20T16:30:00Z'];
	for (let i = 0; i < count; i++) {
		const m = (['clearance', 'seat_runout', 'vacuum_hold'] as const)[i % 3];
		rows.push({
			shopId,
			headId,
			familyId,
			stage: STAGES[(i >> 1) % 2],
			cylinder: 1 + (i % 4),
			side: SIDES[i % 2],
			valve: 1 + ((i >> 2) % 2),
			measurement: m,
			value: m === 'vacuum_hold' ? 90 + Math.round(next() * 20) / 2 : Math.round(next() * 150) / 1000,
			// Unique per row; the last second of January moves back, so it stays in January.
			measuredAt: new Date(Date.parse(times[i % times.length]) + (i % times.length === 0 ? -1 : 1) * Math.floor(i / times.length) * 1000),
			measuredBy: ['Ada Test', 'Bo Test'][i % 2]
		});
	}
	return rows;
}

beforeAll(async () => {
	const ctx = await makeShop(db, 'summaries');
	shopId = ctx.shop.id;
	familyId = ctx.family.id;
});
afterAll(() => sql.end());

describe('series keys', () => {
	it('lapmark_series() in the database and seriesKey() agree for every measurement × stage × side', async () => {
		const rows = await db.execute<{ m: string; st: string; sd: string; key: number }>(raw`
			select m::text, st::text, sd::text, lapmark_series(m, st, sd) as key
			from unnest(enum_range(null::measurement)) m, unnest(enum_range(null::stage)) st, unnest(enum_range(null::side)) sd`);
		expect(rows.length).toBe(MEASUREMENTS.length * 4);
		for (const r of rows) expect(r.key, `${r.m} ${r.st} ${r.sd}`).toBe(seriesKey(r.m as never, r.st as never, r.sd as never));
		expect(new Set(rows.map((r) => r.key)).size).toBe(rows.length);
	});

	it('lapmark_series() is inlined into the expression that computes series_key, not called per row', async () => {
		// A SQL function declared STRICT whose body is not strict (CASE) is executed as a query of
		// its own for every row written (drizzle/0005); inlined, the plan shows the CASE itself.
		const plan = await db.execute<{ 'QUERY PLAN': string }>(raw`
			explain (verbose, costs off) select lapmark_series(m, 'final', 'intake') from unnest(enum_range(null::measurement)) m`);
		const text = plan.map((r) => r['QUERY PLAN']).join('\n');
		expect(text).toMatch(/CASE m/);
		expect(text).not.toMatch(/lapmark_series/);
	});
});

describe('summaries stay equal to a full recomputation', () => {
	it('after a many-row insert (one statement)', async () => {
		const head = await newHead();
		await withShop(db, shopId, (tx) => tx.insert(readings).values(spread(head, 160, 7)));
		const got = await expectConsistent();
		expect(got.counts.length).toBeGreaterThan(20);
		// A reading at 23:59:59 on 31 January (UTC) belongs to January, one at midnight to February.
		expect(new Set(got.moments.map((m) => m.month))).toEqual(new Set(['2026-01-01', '2026-02-01', '2026-03-01']));
	});

	it('after single-row inserts into an existing group and a new one', async () => {
		const head = await newHead();
		for (const [i, value] of [0.05, 0.051, 0.05].entries()) {
			await withShop(db, shopId, (tx) =>
				tx.insert(readings).values({ ...spread(head, 1, 1)[0], value, measuredAt: new Date(`2026-02-0${i + 3}T08:00:00Z`) })
			);
		}
		await expectConsistent();
	});

	it('after a bulk write as the import makes it (COPY into a staging table, one INSERT … SELECT), and its undo', async () => {
		// The statements of src/lib/server/queries/import-finish.ts (called by import/run.ts), over postgres.js as it runs them: a batch,
		// its heads, a COPY into a temporary staging table, one INSERT … SELECT into readings.
		const lines: string[] = [];
		for (let h = 1; h <= 3; h++) {
			for (let c = 1; c <= 4; c++) {
				for (const side of SIDES) {
					for (let v = 1; v <= 2; v++) {
						const clr = (40 + ((h * 7 + c * 5 + v * 3 + (side === 'exhaust' ? 20 : 0)) % 40)) / 1000;
						lines.push(`IMP-${h}\tas_received\t${c}\t${side}\t${v}\tclearance\t${clr.toFixed(3)}\t2026-02-2${h}T09:00:00Z\tAda Test\n`);
						lines.push(`IMP-${h}\tas_received\t${c}\t${side}\t${v}\tseat_runout\t0.01${c}\t2026-02-2${h}T09:00:00Z\tAda Test\n`);
					}
				}
			}
		}
		const batchId = await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
			const [b] = await t<{ id: string }[]>`
				insert into import_batches (shop_id, file_name, content_hash, layout, on_reject, status)
				values (${shopId}, 'summaries.csv', 'test', 'long', 'abort', 'committed') returning id`;
			await t`
				insert into heads (shop_id, family_id, serial, received_on, created_by_batch)
				select ${shopId}, ${familyId}, 'IMP-' || i, '2026-02-20', ${b.id} from generate_series(1, 3) i`;
			await t.unsafe(`create temp table stage (serial text, stage stage, cylinder smallint, side side, valve smallint,
				measurement measurement, value double precision, measured_at timestamptz, measured_by text) on commit drop`);
			await pipeline(Readable.from(lines), await t.unsafe('copy stage from stdin').writable());
			const inserted = await t`
				insert into readings (shop_id, head_id, family_id, stage, cylinder, side, valve, measurement, value, measured_at, measured_by, batch_id)
				select ${shopId}::uuid, h.id, h.family_id, s.stage, s.cylinder, s.side, s.valve, s.measurement, s.value, s.measured_at, s.measured_by, ${b.id}::uuid
				from stage s join heads h on h.shop_id = ${shopId} and h.serial = s.serial
				on conflict on constraint readings_identity_key do nothing`;
			expect(inserted.count).toBe(3 * 16 * 2);
			return b.id;
		});
		await expectConsistent();

		// Undo (queries/imports.ts) deletes the batch's readings and heads: the summaries lose them.
		const undone = await withShop(db, shopId, (tx) => undoBatch(tx, shopId, batchId));
		expect(undone).toMatchObject({ ok: true, readingsRemoved: 96, headsRemoved: 3 });
		await expectConsistent();
	});

	it('after updates: a new value, a move to another month, a move to another series', async () => {
		await withShop(db, shopId, async (tx) => {
			await tx.execute(raw`update readings set value = value + 0.001 where shop_id = ${shopId} and measurement = 'clearance' and id % 3 = 0`);
			await tx.execute(raw`update readings set measured_at = measured_at + interval '40 days' where shop_id = ${shopId} and id % 5 = 0`);
			await tx.execute(raw`update readings set side = 'exhaust' where shop_id = ${shopId} and side = 'intake' and id % 7 = 0`);
		});
		await expectConsistent();
	});

	it('after deletes: one reading, then a whole head by cascade, then the last reading of a group-month', async () => {
		await withShop(db, shopId, (tx) => tx.execute(raw`delete from readings where id = (select min(id) from readings where shop_id = ${shopId})`));
		await expectConsistent();
		const head = await newHead('2026-03-02');
		await withShop(db, shopId, (tx) => tx.insert(readings).values(spread(head, 40, 99)));
		await withShop(db, shopId, (tx) => tx.execute(raw`delete from heads where id = ${head}`));
		await expectConsistent();
		const lone = await newHead('2026-05-02');
		await withShop(db, shopId, (tx) =>
			tx.insert(readings).values({ ...spread(lone, 1, 3)[0], measurement: 'margin', value: 1.2, measuredAt: new Date('2026-05-03T08:00:00Z') })
		);
		let got = await expectConsistent();
		expect(got.moments.some((m) => m.month === '2026-05-01')).toBe(true);
		await withShop(db, shopId, (tx) => tx.execute(raw`delete from readings where head_id = ${lone}`));
		got = await expectConsistent();
		expect(got.moments.some((m) => m.month === '2026-05-01')).toBe(false);
	});

	it('groupData reads the same from summaries (+ month edges) as from readings alone', async () => {
		const base: Selection = {
			familyIds: [familyId],
			keys: seriesKeys('clearance'),
			from: null,
			to: null,
			machinist: null,
			customer: null,
			mileageMin: null,
			mileageMax: null
		};
		for (const [from, to] of [
			[null, null],
			['2026-01-15', '2026-03-10'],
			['2026-02-01', '2026-02-28'],
			['2026-02-10', '2026-02-20'],
			[null, '2026-02-13'],
			['2026-02-02', null]
		] as const) {
			const sel = { ...base, from, to };
			const [auto, direct] = await withShop(db, shopId, async (tx) => [await groupData(tx, shopId, sel), await groupData(tx, shopId, sel, { source: 'readings' })]);
			expect(direct.source).toBe('readings');
			if (!from && !to) expect(auto.source).toBe('summaries');
			expect(auto.groups.map((g) => g.counts)).toEqual(direct.groups.map((g) => g.counts));
			auto.groups.forEach((g, i) => {
				const d = direct.groups[i].moments;
				expect(g.moments.n).toBe(d.n);
				expect(g.moments.min).toBe(d.min);
				expect(g.moments.max).toBe(d.max);
				expect(g.moments.mean).toBeCloseTo(d.mean, 12);
				expect(Math.abs(g.moments.m2 - d.m2)).toBeLessThanOrEqual(1e-12 * Math.max(1e-9, d.m2));
			});
		}
	});

	it('stay numerically stable under many Chan merges (NIST StRD NumAcc construction, shifted)', async () => {
		// NIST StRD NumAcc2/NumAcc3 are built as a first value and 500 pairs (x.1, x.3) around it:
		// mean x.2 and SD 0.1 exactly (docs/REFERENCES.md B1). Here x = 3599 (fluid hold, within the
		// plausible range), sent in 11 statements so the stored moments are merged 10 times; GSL's
		// tolerance for NumAcc3's SD is 1e-9 relative (docs/REFERENCES.md B1).
		const head = await newHead('2026-07-01');
		const values = [3599.2, ...Array.from({ length: 500 }, () => [3599.1, 3599.3]).flat()];
		for (let part = 0; part < 11; part++) {
			const slice = values.slice(part * 91, (part + 1) * 91);
			await withShop(db, shopId, (tx) =>
				tx.insert(readings).values(
					slice.map((value, i) => ({
						...spread(head, 1, 5)[0],
						stage: 'final' as const,
						measurement: 'fluid_hold' as const,
						value,
						measuredAt: new Date(Date.UTC(2026, 6, 2, 0, 0, part * 91 + i))
					}))
				)
			);
		}
		await expectConsistent();
		const sel: Selection = { familyIds: [familyId], keys: [seriesKey('fluid_hold', 'final', 'intake')], from: null, to: null, machinist: null, customer: null, mileageMin: null, mileageMax: null };
		const { groups } = await withShop(db, shopId, (tx) => groupData(tx, shopId, sel));
		const m = groups[0].moments;
		expect(m.n).toBe(1001);
		expect(Math.abs(m.mean - 3599.2) / 3599.2).toBeLessThan(1e-15);
		expect(Math.abs(Math.sqrt(m.m2 / (m.n - 1)) - 0.1) / 0.1).toBeLessThan(1e-9);
	});

	it('after imports through runImport, each way into readings (straight in and staged), and their undo', async () => {
		// The import COPYs the readings of new heads straight into readings (as lapmark_import) in
		// one or more statements and inserts the rest from its staging table; the triggers keep the
		// summaries either way. The second file adds to group-months the first one made.
		const header = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm,seat_runout_mm,vacuum_hold_pct';
		const file = (prefix: string, seed: number) => {
			let x = seed;
			const next = () => (x = (x * 1103515245 + 12345) % 2147483648) / 2147483648;
			const lines = [header];
			for (let h = 1; h <= 6; h++) {
				for (let c = 1; c <= 4; c++) {
					for (const side of SIDES) {
						for (let v = 1; v <= 2; v++) {
							const at = ['2026-01-31T23:59:59Z', '2026-02-01T00:00:00Z', '2026-02-17T07:30:00Z'][h % 3];
							lines.push(`${prefix}-${h},TEST-4,${h % 2 ? 'final' : 'as_received'},${c},${side},${v},${at},Ada Test,${(Math.round(next() * 120) / 1000).toFixed(3)},0.0${Math.floor(next() * 9)},${90 + Math.round(next() * 20) / 2}`);
						}
					}
				}
			}
			return lines.join('\n') + '\n';
		};
		const prefixes = ['RUN-A', 'RUN-B', 'RUN-C'];
		const batches = await importEachWay(sql, shopId, {
			label: 'summaries test',
			readings: 6 * 16 * 3,
			file: (way, i) => file(prefixes[i], prefixes[i].length * 7 + (way !== 'staged' ? 1 : 2)),
			after: expectConsistent
		});
		const undone = await withShop(db, shopId, (tx) => undoBatch(tx, shopId, batches[0]));
		expect(undone).toMatchObject({ ok: true, readingsRemoved: 6 * 16 * 3, headsRemoved: 6 });
		await expectConsistent();
	});

	it('after deleting every reading of the shop, nothing is left', async () => {
		await withShop(db, shopId, (tx) => tx.execute(raw`delete from readings where shop_id = ${shopId}`));
		const got = await expectConsistent();
		expect(got.moments).toEqual([]);
		expect(got.counts).toEqual([]);
	});
});
