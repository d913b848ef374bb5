// The valve-position tallies the rates read (reading_position_tallies, drizzle/0013) must equal a
// recomputation from readings and limits after every kind of write: inserts, updates of value,
// time (across months), side (another series) and head (another family), deletes, a head's
// cascaded delete, the CSV import each way into readings and its undo, and limit versions added,
// edited and removed. The recomputation here judges each reading by a date-range join on the
// limit versions and chains a position's months with correlated subqueries, independent of the
// triggers' width_bucket and window functions. And the rates answers read from the tallies must
// be the ones read from readings, for selections with and without dates, on each side.
import { eq } from 'drizzle-orm';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { SIDES, STAGES, type Side, type Stage } from '../../src/lib/measurements';
import { withShop, type ScopedWork } from '../../src/lib/server/db/scope';
import { families, heads, limits, readings } from '../../src/lib/server/db/schema';
import { seriesKeys } from '../../src/lib/server/db/series';
import { undoBatch } from '../../src/lib/server/queries/imports';
import { measurementTallies, monthlyPositionTallies, talliesSource, type Selection } from '../../src/lib/server/queries/stats';
import { importEachWay, makeShop, raw, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;
let familyId: string;
let otherFamilyId: string;

type Row = Record<string, unknown>;

const inShop = <T>(work: ScopedWork<T>) => withShop(db, shopId, work);

async function stored() {
	return inShop((tx) =>
		tx.execute<Row>(raw`
			select series_key, family_id, month::text, cylinder, prev_month::text, checked, failed
			from reading_position_tallies where shop_id = ${shopId} order by 1, 2, 3, 4, 5`)
	);
}

/** The same table from readings and limits, by another route than the triggers'. */
async function recomputed() {
	return inShop((tx) =>
		tx.execute<Row>(raw`
			with versions as (
				select l.family_id, lapmark_series(l.measurement, l.stage, l.side) as series_key, l.effective_from, l.min, l.max,
					(select min(n.effective_from) from limits n where n.shop_id = l.shop_id and n.family_id = l.family_id
						and n.measurement = l.measurement and n.stage = l.stage and n.side = l.side and n.effective_from > l.effective_from) as until
				from limits l where l.shop_id = ${shopId}
			), pm as (
				select r.head_id, r.family_id, r.series_key, r.cylinder, r.valve,
					date_trunc('month', r.measured_at at time zone 'UTC')::date as month,
					bool_or(r.value < coalesce(v.min, 0) or r.value > coalesce(v.max, 1e9)) as failed
				from readings r join versions v on v.family_id = r.family_id and v.series_key = r.series_key
					and (r.measured_at at time zone 'UTC')::date >= v.effective_from
					and (v.until is null or (r.measured_at at time zone 'UTC')::date < v.until)
				where r.shop_id = ${shopId}
				group by 1, 2, 3, 4, 5, 6
			), entries as (
				select p.series_key, p.family_id, p.month, p.cylinder, 1 as checked, 0 as failed,
					coalesce((select max(q.month) from pm q where q.head_id = p.head_id and q.series_key = p.series_key
						and q.cylinder = p.cylinder and q.valve = p.valve and q.month < p.month), '-infinity') as prev_month
				from pm p
				union all
				select p.series_key, p.family_id, p.month, p.cylinder, 0, 1,
					coalesce((select max(q.month) from pm q where q.head_id = p.head_id and q.series_key = p.series_key
						and q.cylinder = p.cylinder and q.valve = p.valve and q.month < p.month and q.failed), '-infinity')
				from pm p where p.failed
			)
			select series_key, family_id, month::text, cylinder, prev_month::text, sum(checked)::int as checked, sum(failed)::int as failed
			from entries group by 1, 2, 3, 4, 5 order by 1, 2, 3, 4, 5`)
	);
}

async function expectConsistent() {
	const [got, want] = await Promise.all([stored(), recomputed()]);
	expect(got).toEqual(want);
	return got;
}

const base: Selection = { familyIds: null, keys: seriesKeys('clearance', 'as_received'), from: null, to: null, machinist: null, customer: null, mileageMin: null, mileageMax: null };

/** Selections: both sides and each, both stages, whole months, partial months, open ends. */
function selections(): Selection[] {
	const ranges: [string | null, string | null][] = [
		[null, null],
		['2026-02-01', '2026-02-28'],
		['2026-01-01', '2026-03-31'],
		['2026-02-01', null],
		[null, '2026-02-28'],
		['2026-03-01', '2026-04-30'],
		['2026-01-15', '2026-03-10'],
		['2026-02-10', '2026-02-20'],
		[null, '2026-02-13'],
		['2026-02-02', null]
	];
	const keySets = [seriesKeys('clearance', 'as_received'), seriesKeys('clearance', 'as_received', 'intake'), seriesKeys('clearance', 'as_received', 'exhaust'), seriesKeys('clearance', 'final'), seriesKeys('seat_runout', 'final', 'exhaust')];
	const out: Selection[] = [];
	for (const keys of keySets) for (const [from, to] of ranges) out.push({ ...base, keys, from, to });
	out.push({ ...base, familyIds: [otherFamilyId] }, { ...base, familyIds: [familyId], from: '2026-02-01', to: '2026-03-31' });
	return out;
}

/** Every selection's tallies, from the summaries where they answer, equal those from readings. */
async function expectAnswersAgree() {
	let fromSummaries = 0;
	for (const sel of selections()) {
		const [auto, direct, monthly, monthlyDirect] = await inShop(async (tx) => [
			await measurementTallies(tx, shopId, sel),
			await measurementTallies(tx, shopId, sel, { source: 'readings' }),
			await monthlyPositionTallies(tx, shopId, sel),
			await monthlyPositionTallies(tx, shopId, sel, { source: 'readings' })
		]);
		expect(auto, JSON.stringify(sel)).toEqual(direct);
		expect(monthly, JSON.stringify(sel)).toEqual(monthlyDirect);
		if (talliesSource(sel) === 'summaries') fromSummaries++;
	}
	expect(fromSummaries).toBe(5 * 6 + 2);
}

let headSeq = 0;
async function newHead(family = familyId) {
	const [h] = await inShop((tx) => tx.insert(heads).values({ shopId, familyId: family, serial: `RT-${++headSeq}`, receivedOn: '2026-01-02' }).returning());
	return h.id;
}

function reading(headId: string, o: { stage?: Stage; side?: Side; cylinder?: number; valve?: number; measurement?: 'clearance' | 'seat_runout'; value: number; at: string; family?: string }) {
	return {
		shopId,
		headId,
		familyId: o.family ?? familyId,
		stage: o.stage ?? ('as_received' as Stage),
		cylinder: o.cylinder ?? 1,
		side: o.side ?? ('intake' as Side),
		valve: o.valve ?? 1,
		measurement: o.measurement ?? ('clearance' as const),
		value: o.value,
		measuredAt: new Date(o.at),
		measuredBy: 'Ada Test'
	};
}

async function limit(family: string, measurement: 'clearance' | 'seat_runout', stage: Stage, side: Side, max: number, effectiveFrom: string) {
	await inShop((tx) => tx.insert(limits).values({ shopId, familyId: family, measurement, stage, side, min: null, max, effectiveFrom }));
}

beforeAll(async () => {
	const ctx = await makeShop(db, 'rate-tallies');
	shopId = ctx.shop.id;
	familyId = ctx.family.id;
	const [other] = await inShop((tx) =>
		tx.insert(families).values({ shopId, code: 'TEST-6', description: 'Second test family', cylinders: 6, intakeValves: 2, exhaustValves: 2, intakeStemMm: 7, exhaustStemMm: 7 }).returning()
	);
	otherFamilyId = other.id;
	// Clearance limits from 10 January (a reading before then is not judged), tightened on
	// 1 March; the other family's and the final stage's from the start of the year.
	for (const side of SIDES) {
		await limit(familyId, 'clearance', 'as_received', side, 0.08, '2026-01-10');
		await limit(familyId, 'clearance', 'as_received', side, 0.07, '2026-03-01');
		await limit(otherFamilyId, 'clearance', 'as_received', side, 0.09, '2026-01-01');
		await limit(familyId, 'clearance', 'final', side, 0.06, '2026-01-01');
	}
	await limit(familyId, 'seat_runout', 'final', 'exhaust', 0.03, '2026-01-01');
});
afterAll(() => sql.end());

describe('position tallies: the months of one position pool exactly', () => {
	it('a position re-measured across months counts once over the months, once in each month', async () => {
		const head = await newHead();
		await inShop((tx) =>
			tx.insert(readings).values([
				// Cylinder 1 intake valve 1: within limits in January, outside in February, within in March.
				reading(head, { value: 0.05, at: '2026-01-20T08:00:00Z' }),
				reading(head, { value: 0.085, at: '2026-02-03T08:00:00Z' }),
				reading(head, { value: 0.06, at: '2026-03-05T08:00:00Z' }),
				// Cylinder 2 intake valve 1: before the first limit version (5 January), then
				// 0.075 on 28 February (within 0.08) and 0.075 on 1 March (outside the new 0.07).
				reading(head, { cylinder: 2, value: 0.2, at: '2026-01-05T08:00:00Z' }),
				reading(head, { cylinder: 2, value: 0.075, at: '2026-02-28T23:59:59Z' }),
				reading(head, { cylinder: 2, value: 0.075, at: '2026-03-01T00:00:00Z' }),
				// Cylinder 1 exhaust valve 1: twice in February, the second outside.
				reading(head, { side: 'exhaust', value: 0.04, at: '2026-02-10T08:00:00Z' }),
				reading(head, { side: 'exhaust', value: 0.09, at: '2026-02-11T08:00:00Z' })
			])
		);
		const got = await expectConsistent();
		expect(got.length).toBeGreaterThan(0);
		const tally = (from: string | null, to: string | null, side?: Side) =>
			inShop((tx) => measurementTallies(tx, shopId, { ...base, keys: seriesKeys('clearance', 'as_received', side), from, to }));
		// All time: three positions judged (the reading of 5 January is not), all three failed.
		expect(await tally(null, null)).toEqual([
			{ familyId, side: 'exhaust', cylinder: 1, n: 1, failures: 1 },
			{ familyId, side: 'intake', cylinder: 1, n: 1, failures: 1 },
			{ familyId, side: 'intake', cylinder: 2, n: 1, failures: 1 }
		]);
		// January alone: only cylinder 1 intake, within its limits.
		expect(await tally('2026-01-01', '2026-01-31', 'intake')).toEqual([{ familyId, side: 'intake', cylinder: 1, n: 1, failures: 0 }]);
		// February: both intake positions judged, cylinder 1 failed (0.085), cylinder 2 did not.
		expect(await tally('2026-02-01', '2026-02-28', 'intake')).toEqual([
			{ familyId, side: 'intake', cylinder: 1, n: 1, failures: 1 },
			{ familyId, side: 'intake', cylinder: 2, n: 1, failures: 0 }
		]);
		// March: cylinder 1 within (0.06), cylinder 2 outside the tightened limit.
		expect(await tally('2026-03-01', '2026-03-31', 'intake')).toEqual([
			{ familyId, side: 'intake', cylinder: 1, n: 1, failures: 0 },
			{ familyId, side: 'intake', cylinder: 2, n: 1, failures: 1 }
		]);
		// February to April: a position judged in February and in March counts once.
		expect(await tally('2026-02-01', '2026-04-30', 'intake')).toEqual([
			{ familyId, side: 'intake', cylinder: 1, n: 1, failures: 1 },
			{ familyId, side: 'intake', cylinder: 2, n: 1, failures: 1 }
		]);
		const monthly = await inShop((tx) => monthlyPositionTallies(tx, shopId, { ...base, familyIds: [familyId] }));
		expect(monthly).toEqual([
			{ familyId, month: '2026-01-01', n: 1, failures: 0 },
			{ familyId, month: '2026-02-01', n: 3, failures: 2 },
			{ familyId, month: '2026-03-01', n: 2, failures: 1 }
		]);
		await expectAnswersAgree();
	});

	it('a new, an edited and a removed limit version judge the family × series again', async () => {
		const tally = () => inShop((tx) => measurementTallies(tx, shopId, { ...base, keys: seriesKeys('clearance', 'as_received', 'intake'), familyIds: [familyId] }));
		// A version from 1 January: the reading of 5 January (0.2) is now judged, and fails.
		await limit(familyId, 'clearance', 'as_received', 'intake', 0.1, '2026-01-01');
		await expectConsistent();
		expect(await tally()).toEqual([
			{ familyId, side: 'intake', cylinder: 1, n: 1, failures: 1 },
			{ familyId, side: 'intake', cylinder: 2, n: 1, failures: 1 }
		]);
		// March's version relaxed to 0.09: cylinder 1 still fails in February; cylinder 2 no longer fails in March.
		await inShop((tx) => tx.update(limits).set({ max: 0.09 }).where(eq(limits.effectiveFrom, '2026-03-01')));
		await expectConsistent();
		const march = await inShop((tx) => measurementTallies(tx, shopId, { ...base, keys: seriesKeys('clearance', 'as_received', 'intake'), from: '2026-03-01', to: '2026-03-31' }));
		expect(march).toEqual([
			{ familyId, side: 'intake', cylinder: 1, n: 1, failures: 0 },
			{ familyId, side: 'intake', cylinder: 2, n: 1, failures: 0 }
		]);
		// Removing the 1 January version: 5 January is unjudged again.
		await inShop((tx) => tx.delete(limits).where(eq(limits.effectiveFrom, '2026-01-01')));
		await expectConsistent();
		await expectAnswersAgree();
		// Back as it was, for the tests below.
		await inShop((tx) => tx.update(limits).set({ max: 0.07 }).where(eq(limits.effectiveFrom, '2026-03-01')));
		for (const side of SIDES) {
			await limit(otherFamilyId, 'clearance', 'as_received', side, 0.09, '2026-01-01');
			await limit(familyId, 'clearance', 'final', side, 0.06, '2026-01-01');
		}
		await limit(familyId, 'seat_runout', 'final', 'exhaust', 0.03, '2026-01-01');
		await expectConsistent();
	});
});

describe('position tallies stay equal to a recomputation (property)', () => {
	const months = ['2026-01-05', '2026-01-31', '2026-02-01', '2026-02-14', '2026-02-28', '2026-03-01', '2026-03-20', '2026-04-02'];
	const pos = fc.record({
		head: fc.integer({ min: 0, max: 3 }),
		stage: fc.constantFrom(...STAGES),
		side: fc.constantFrom(...SIDES),
		cylinder: fc.integer({ min: 1, max: 2 }),
		valve: fc.integer({ min: 1, max: 2 }),
		measurement: fc.constantFrom('clearance' as const, 'seat_runout' as const)
	});
	const op = fc.oneof(
		fc.record({ kind: fc.constant('insert' as const), rows: fc.array(fc.record({ pos, day: fc.integer({ min: 0, max: months.length - 1 }), hour: fc.integer({ min: 0, max: 23 }), value: fc.integer({ min: 0, max: 120 }) }), { minLength: 1, maxLength: 12 }) }),
		fc.record({ kind: fc.constant('value' as const), mod: fc.integer({ min: 2, max: 4 }), delta: fc.integer({ min: -30, max: 30 }) }),
		fc.record({ kind: fc.constant('move' as const), mod: fc.integer({ min: 2, max: 4 }), days: fc.integer({ min: -40, max: 40 }) }),
		fc.record({ kind: fc.constant('side' as const), mod: fc.integer({ min: 2, max: 5 }) }),
		fc.record({ kind: fc.constant('family' as const), head: fc.integer({ min: 0, max: 3 }) }),
		fc.record({ kind: fc.constant('delete' as const), mod: fc.integer({ min: 2, max: 5 }) }),
		fc.record({ kind: fc.constant('limit' as const), side: fc.constantFrom(...SIDES), day: fc.integer({ min: 0, max: months.length - 1 }), max: fc.integer({ min: 20, max: 110 }) }),
		fc.record({ kind: fc.constant('limit-edit' as const), max: fc.integer({ min: 20, max: 110 }) }),
		fc.record({ kind: fc.constant('limit-delete' as const) })
	);

	it('after random inserts, updates, deletes and limit changes', async () => {
		await fc.assert(
			fc.asyncProperty(fc.array(op, { minLength: 1, maxLength: 6 }), async (ops) => {
				const hs = [await newHead(), await newHead(), await newHead(otherFamilyId), await newHead()];
				const mine = raw`head_id = any(${`{${hs.join(',')}}`}::uuid[])`;
				for (const o of ops) {
					await inShop(async (tx) => {
						if (o.kind === 'insert') {
							const [fams] = [await tx.select({ id: heads.id, familyId: heads.familyId }).from(heads).where(raw`${heads.id} = any(${`{${hs.join(',')}}`}::uuid[])`)];
							const famOf = new Map(fams.map((f) => [f.id, f.familyId]));
							const seen = new Set<string>();
							const rows = o.rows
								.map((r) => {
									const at = `${months[r.day]}T${String(r.hour).padStart(2, '0')}:00:00Z`;
									return reading(hs[r.pos.head], { ...r.pos, family: famOf.get(hs[r.pos.head]), value: r.value / 1000, at });
								})
								.filter((r) => {
									const k = `${r.headId}|${r.stage}|${r.cylinder}|${r.side}|${r.valve}|${r.measurement}|${r.measuredAt.toISOString()}`;
									return !seen.has(k) && seen.add(k);
								});
							await tx.insert(readings).values(rows).onConflictDoNothing();
						} else if (o.kind === 'value') {
							await tx.execute(raw`update readings set value = greatest(0, least(1, value + ${o.delta / 1000})) where ${mine} and id % ${o.mod} = 0`);
						} else if (o.kind === 'move') {
							await tx.execute(raw`update readings r set measured_at = measured_at + make_interval(days => ${o.days}) where ${mine} and id % ${o.mod} = 1
								and not exists (select 1 from readings q where q.head_id = r.head_id and q.stage = r.stage and q.cylinder = r.cylinder and q.side = r.side
									and q.valve = r.valve and q.measurement = r.measurement and q.measured_at = r.measured_at + make_interval(days => ${o.days}))`);
						} else if (o.kind === 'side') {
							await tx.execute(raw`update readings r set side = 'exhaust' where ${mine} and side = 'intake' and id % ${o.mod} = 0
								and not exists (select 1 from readings q where q.head_id = r.head_id and q.stage = r.stage and q.cylinder = r.cylinder and q.side = 'exhaust'
									and q.valve = r.valve and q.measurement = r.measurement and q.measured_at = r.measured_at)`);
						} else if (o.kind === 'family') {
							// A head moved to the other family: its readings follow by the cascading key.
							const [h] = await tx.select().from(heads).where(eq(heads.id, hs[o.head]));
							await tx.update(heads).set({ familyId: h.familyId === familyId ? otherFamilyId : familyId }).where(eq(heads.id, hs[o.head]));
						} else if (o.kind === 'delete') {
							await tx.execute(raw`delete from readings where ${mine} and id % ${o.mod} = 0`);
						} else if (o.kind === 'limit') {
							await tx
								.insert(limits)
								.values({ shopId, familyId, measurement: 'clearance', stage: 'as_received', side: o.side, min: null, max: o.max / 1000, effectiveFrom: months[o.day] })
								.onConflictDoUpdate({ target: [limits.familyId, limits.measurement, limits.side, limits.stage, limits.effectiveFrom], set: { max: o.max / 1000 } });
						} else if (o.kind === 'limit-edit') {
							await tx.execute(raw`update limits set max = ${o.max / 1000} where shop_id = ${shopId} and measurement = 'seat_runout'`);
						} else {
							await tx.execute(raw`delete from limits where id = (select id from limits where shop_id = ${shopId} and effective_from not in ('2026-01-01', '2026-01-10', '2026-03-01') order by id limit 1)`);
						}
					});
					await expectConsistent();
				}
				await expectAnswersAgree();
				// A head deleted: its readings go by cascade.
				await inShop((tx) => tx.delete(heads).where(eq(heads.id, hs[0])));
				await expectConsistent();
			}),
			{ numRuns: 12 }
		);
	});
});

describe('position tallies after imports', () => {
	it('through runImport, each way into readings (straight in and staged), and their undo', async () => {
		const header = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm,seat_runout_mm';
		const file = (prefix: string, seed: number) => {
			let x = seed;
			const next = () => (x = (x * 1103515245 + 12345) % 2147483648) / 2147483648;
			const lines = [header];
			for (let h = 1; h <= 5; h++) {
				for (let c = 1; c <= 4; c++) {
					for (const side of SIDES) {
						for (let v = 1; v <= 2; v++) {
							const at = ['2026-01-31T23:59:59Z', '2026-02-01T00:00:00Z', '2026-03-17T07:30:00Z'][h % 3];
							lines.push(`${prefix}-${h},TEST-4,${h % 2 ? 'final' : 'as_received'},${c},${side},${v},${at},Ada Test,${(Math.round(next() * 110) / 1000).toFixed(3)},0.0${Math.floor(next() * 5)}`);
						}
					}
				}
			}
			return lines.join('\n') + '\n';
		};
		const prefixes = ['RTI-A', 'RTI-B', 'RTI-C'];
		const batches = await importEachWay(sql, shopId, {
			label: 'rate tallies test',
			readings: 5 * 16 * 2,
			file: (way, i) => file(prefixes[i], prefixes[i].length * 11 + (way !== 'staged' ? 1 : 2)),
			after: expectConsistent
		});
		await expectAnswersAgree();
		const undone = await inShop((tx) => undoBatch(tx, shopId, batches[0]));
		expect(undone).toMatchObject({ ok: true, readingsRemoved: 5 * 16 * 2, headsRemoved: 5 });
		await expectConsistent();
		await expectAnswersAgree();
	});

	it('after deleting every reading of the shop, nothing is left', async () => {
		await inShop((tx) => tx.execute(raw`delete from readings where shop_id = ${shopId}`));
		expect(await expectConsistent()).toEqual([]);
	});
});
