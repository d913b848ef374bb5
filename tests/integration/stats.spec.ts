// The statistics engine end to end against the real database: small data sets inserted here,
// expected values worked out by hand (shown beside each check) or by the pure functions of
// src/lib/server/stats, whose own specs check them against NIST StRD, Newcombe, Fisher and the
// Shewhart constants. Each published value used here names its source.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CheckQuery } from '../../src/lib/schemas/stats';
import { withShop } from '../../src/lib/server/db/scope';
import { families, heads, limits, readings } from '../../src/lib/server/db/schema';
import {
	capabilityStudy,
	checkReading,
	comebacks,
	compare,
	control,
	describeValues,
	distribution,
	outliers,
	rates,
	wear
} from '../../src/lib/server/services/stats';
import { capability, chiSquare2x2, controlChart, describe as describeStats, histogramSorted, momentsOf, momentsToSummary, quantileType7, wilson } from '../../src/lib/server/stats';
import { makeShop, raw, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;
let A: string; // TEST-4: 4 cylinders, 2 intake and 2 exhaust valves each
let B: string; // TEST-6: 6 cylinders, 1 + 1 valves
const H: string[] = []; // three heads of A

const tx = <T>(work: (t: Parameters<Parameters<typeof withShop>[2]>[0]) => Promise<T>) => withShop(db, shopId, work);

/** The ten as-received intake clearances of family A (mm). */
const V = [0.041, 0.043, 0.045, 0.047, 0.05, 0.052, 0.055, 0.06, 0.095, 0.15];
const atOf = (i: number) => new Date(`2026-0${1 + (i % 2)}-${10 + i}T10:00:00Z`);

type NewReading = typeof readings.$inferInsert;
const base = (over: Partial<NewReading>): NewReading => ({
	shopId,
	headId: H[0],
	familyId: A,
	stage: 'as_received',
	cylinder: 1,
	side: 'intake',
	valve: 1,
	measurement: 'clearance',
	value: 0.05,
	measuredAt: new Date('2026-03-01T08:00:00Z'),
	measuredBy: 'Ada Test',
	...over
});

beforeAll(async () => {
	const ctx = await makeShop(db, 'stats');
	shopId = ctx.shop.id;
	A = ctx.family.id;
	await tx(async (t) => {
		const [b] = await t
			.insert(families)
			.values({ shopId, code: 'TEST-6', cylinders: 6, intakeValves: 1, exhaustValves: 1, intakeStemMm: 7, exhaustStemMm: 7 })
			.returning();
		B = b.id;
		const hs = await t
			.insert(heads)
			.values([
				{ shopId, familyId: A, serial: 'A-1', receivedOn: '2026-01-02', customer: 'North Garage', mileageKm: 100_000, status: 'released', releasedOn: '2026-03-10' },
				{ shopId, familyId: A, serial: 'A-2', receivedOn: '2026-01-02', customer: 'South Garage', mileageKm: 200_000, status: 'released', releasedOn: '2026-03-11' },
				{ shopId, familyId: A, serial: 'A-3', receivedOn: '2026-01-02', customer: 'North Garage', mileageKm: 300_000 }
			])
			.returning();
		H.push(...hs.map((h) => h.id));
		// A comeback of A-1 (comeback rate of A: 1 of 2 released heads).
		await t.insert(heads).values({ shopId, familyId: A, serial: 'A-1-C1', receivedOn: '2026-04-01', comebackOf: H[0], mileageKm: 104_000 });
		const [hb] = await t.insert(heads).values({ shopId, familyId: B, serial: 'B-1', receivedOn: '2026-01-02', mileageKm: 50_000 }).returning();

		const lim = (familyId: string, measurement: 'clearance', side: 'intake' | 'exhaust', stage: 'as_received' | 'final', min: number | null, max: number | null, effectiveFrom: string) => ({
			shopId,
			familyId,
			measurement,
			side,
			stage,
			min,
			max,
			effectiveFrom
		});
		await t.insert(limits).values([
			lim(A, 'clearance', 'intake', 'as_received', null, 0.1, '2025-01-01'),
			// A tighter version from 1 February 2026: January readings stay judged by 0.10.
			lim(A, 'clearance', 'intake', 'as_received', null, 0.09, '2026-02-01'),
			lim(A, 'clearance', 'exhaust', 'as_received', null, 0.12, '2025-01-01'),
			lim(A, 'clearance', 'intake', 'final', 0.025, 0.065, '2025-01-01'),
			lim(B, 'clearance', 'intake', 'as_received', null, 0.1, '2025-01-01'),
			lim(B, 'clearance', 'exhaust', 'as_received', null, 0.12, '2025-01-01')
		]);

		const rows: NewReading[] = [];
		// D1: reading i on head i % 3, cylinder 1 + ⌊i/3⌋, January for even i, February for odd i.
		V.forEach((value, i) =>
			rows.push(base({ headId: H[i % 3], cylinder: 1 + Math.floor(i / 3), value, measuredAt: atOf(i), measuredBy: i % 2 ? 'Bo Test' : 'Ada Test' }))
		);
		// B: intake 0.06, 0.11, 0.12, 0.13 (3 of 4 over 0.10); exhaust 0.13, 0.05, 0.06, 0.07 (1 of 4 over 0.12).
		[0.06, 0.11, 0.12, 0.13].forEach((value, i) => rows.push(base({ headId: hb.id, familyId: B, cylinder: i + 1, value })));
		[0.13, 0.05, 0.06, 0.07].forEach((value, i) => rows.push(base({ headId: hb.id, familyId: B, cylinder: i + 1, side: 'exhaust', value })));
		// n = 1 (final exhaust clearance of A) and all equal (as-received intake seat runout of A).
		rows.push(base({ stage: 'final', side: 'exhaust', value: 0.05 }));
		for (let c = 1; c <= 4; c++) rows.push(base({ measurement: 'seat_runout', cylinder: c, value: 0.02 }));
		// Final intake clearance of A in time order, for capability and control charts.
		FINAL.forEach((value, i) =>
			rows.push(base({ headId: H[i % 2], stage: 'final', cylinder: 1 + Math.floor(i / 2) % 4, valve: 1 + Math.floor(i / 8), value, measuredAt: new Date(Date.UTC(2026, 2, 1 + i, 9)), measuredBy: i < 4 ? 'Ada Test' : 'Bo Test' }))
		);
		// Face runout on a straight line: 0.01 + 0.002 mm per 10,000 km of the head's mileage.
		for (const [h, km] of [[0, 100_000], [1, 200_000], [2, 300_000]] as const) {
			for (let c = 1; c <= 4; c++) rows.push(base({ headId: H[h], side: 'exhaust', measurement: 'face_runout', cylinder: c, value: Number((0.01 + 0.002 * (km / 10_000)).toFixed(3)) }));
		}
		await t.insert(readings).values(rows);
	});
});
afterAll(() => sql.end());

const FINAL = [0.04, 0.045, 0.042, 0.05, 0.047, 0.044, 0.046, 0.043];
const clearanceAI = { measurement: 'clearance', family: 'TEST-4', side: 'intake', stage: 'as_received' } as const;

describe('distribution', () => {
	it('the ten clearances: moments, type-7 quantiles, MAD, fences, histogram, limits (values by hand)', async () => {
		const d = await tx((t) => distribution(t, shopId, clearanceAI));
		expect(d.source).toBe('summaries');
		expect(d.n).toBe(10);
		const m = momentsToSummary(momentsOf(V));
		expect(d.mean).toBeCloseTo(m.mean as number, 14);
		expect(d.sd).toBeCloseTo(m.sd as number, 14);
		expect([d.min, d.max]).toEqual([0.041, 0.15]);
		// Type 7 (Hyndman & Fan 1996): h = 9p; p50 = (0.05 + 0.052)/2, p25 = 0.045 + 0.25·0.002,
		// p75 = 0.055 + 0.75·0.005, p05 = 0.041 + 0.45·0.002, p95 = 0.095 + 0.55·0.055 (by hand).
		expect(d.quantiles.p50).toBeCloseTo(0.051, 15);
		expect(d.quantiles.p25).toBeCloseTo(0.0455, 15);
		expect(d.quantiles.p75).toBeCloseTo(0.05875, 15);
		expect(d.quantiles.p05).toBeCloseTo(0.0419, 15);
		expect(d.quantiles.p95).toBeCloseTo(0.12525, 15);
		// |x − 0.051| sorted: 0.001 0.001 0.004 0.004 0.006 0.008 0.009 0.010 0.044 0.099 → 0.007.
		expect(d.mad).toBeCloseTo(0.007, 15);
		expect(d.madScaled).toBeCloseTo(1.4826 * 0.007, 15);
		// Fences 0.0455 − 1.5·0.01325 and 0.05875 + 1.5·0.01325; 0.095 and 0.15 lie beyond.
		expect(d.fences.low).toBeCloseTo(0.025625, 15);
		expect(d.fences.high).toBeCloseTo(0.078625, 15);
		expect(d.tukeyOutside).toBe(2);
		expect(d.histogram).toEqual(histogramSorted(V));
		// Limits in force today: the 0.09 version; 0.095 and 0.15 are above it.
		expect(d.limits).toEqual({ min: null, max: 0.09, effectiveFrom: '2026-02-01' });
		expect(d.outsideAsOf).toEqual({ below: 0, above: 2, judged: 10, share: 0.2 });
		// By the limits of each reading's day: 0.095 was read in January, under the 0.10 version.
		expect(d.outside).toEqual({ below: 0, above: 1, judged: 10, share: 0.1 });
		expect(JSON.stringify(d)).not.toMatch(/NaN|Infinity/);
	});

	it('quantiles equal PostgreSQL percentile_cont on the same readings, to the last bit (type 7 both sides)', async () => {
		// A larger quantised set: 500 seat widths at 0.01 mm on B's final exhaust.
		const widths = Array.from({ length: 500 }, (_, i) => Math.round((1.4 + 0.9 * ((i * 7919) % 500) / 500 + 0.05 * Math.sin(i)) * 100) / 100);
		const [hb] = await tx((t) => t.execute<{ id: string }>(raw`select id from heads where serial = 'B-1' and shop_id = ${shopId}`));
		await tx((t) =>
			t.insert(readings).values(
				widths.map((value, i) => base({ headId: hb.id, familyId: B, stage: 'final', side: 'exhaust', measurement: 'seat_width', value, measuredAt: new Date(Date.UTC(2026, 4, 1, 0, 0, i)) }))
			)
		);
		for (const [familyId, family, series] of [
			[A, 'TEST-4', { measurement: 'clearance', side: 'intake', stage: 'as_received' }],
			[B, 'TEST-6', { measurement: 'seat_width', side: 'exhaust', stage: 'final' }]
		] as const) {
			const [pg] = await tx((t) =>
				t.execute<{ q: number[]; mean: number; sd: number }>(raw`
					select percentile_cont(array[0.05, 0.25, 0.5, 0.75, 0.95]) within group (order by value) as q,
						avg(value) as mean, stddev_samp(value) as sd
					from readings where shop_id = ${shopId} and family_id = ${familyId}
						and measurement = ${series.measurement}::measurement and side = ${series.side}::side and stage = ${series.stage}::stage`)
			);
			const d = await tx((t) => distribution(t, shopId, { family, ...series }));
			const q = d.quantiles;
			expect([q.p05, q.p25, q.p50, q.p75, q.p95]).toEqual(pg.q);
			const sorted = (family === 'TEST-4' ? [...V] : [...widths]).sort((a, b) => a - b);
			expect(pg.q).toEqual([0.05, 0.25, 0.5, 0.75, 0.95].map((p) => quantileType7(sorted, p)));
			expect(d.mean).toBeCloseTo(pg.mean, 13);
			expect(d.sd).toBeCloseTo(pg.sd, 13);
		}
	});

	it('filters: dates across a month edge, machinist, customer, mileage (counts by hand), same as from readings alone', async () => {
		// 12 January … 15 February: even i with 10 + i ≥ 12 (January), odd i with 10 + i ≤ 15 (February).
		const dated = await tx((t) => distribution(t, shopId, { ...clearanceAI, from: '2026-01-12', to: '2026-02-15' }));
		expect(dated.source).toBe('readings');
		expect(dated.n).toBe(7);
		expect(dated.quantiles.p50).toBe(0.05); // 0.043 0.045 0.047 0.05 0.052 0.055 0.095
		const wide = await tx((t) => distribution(t, shopId, { ...clearanceAI, from: '2025-12-15', to: '2026-02-20' }));
		expect(wide.source).toBe('summaries+readings');
		expect(wide.n).toBe(10);
		const direct = await tx((t) => distribution(t, shopId, { ...clearanceAI, from: '2025-12-15', to: '2026-02-20' }, { source: 'readings' }));
		expect(wide.quantiles).toEqual(direct.quantiles);
		expect(wide.histogram).toEqual(direct.histogram);
		expect(wide.mean).toBeCloseTo(direct.mean as number, 15);

		const ada = await tx((t) => distribution(t, shopId, { ...clearanceAI, machinist: 'ADA TEST' }));
		expect([ada.n, ada.quantiles.p50, ada.source]).toEqual([5, 0.05, 'readings']); // 0.041 0.045 0.05 0.055 0.095
		const south = await tx((t) => distribution(t, shopId, { ...clearanceAI, customer: 'south garage' }));
		expect([south.n, south.quantiles.p50]).toEqual([3, 0.05]); // i = 1, 4, 7: 0.043 0.05 0.06
		const mid = await tx((t) => distribution(t, shopId, { ...clearanceAI, mileageMin: 150_000, mileageMax: 250_000 }));
		expect(mid.n).toBe(3);
	});

	it('empty selection, n = 1, all values equal: nulls where undefined, never NaN', async () => {
		const none = await tx((t) => distribution(t, shopId, { measurement: 'margin', family: 'TEST-4' }));
		expect(none).toMatchObject({ n: 0, mean: null, sd: null, min: null, max: null, mad: null, iqr: null, histogram: [], tukeyOutside: 0 });
		expect(none.quantiles).toEqual({ p05: null, p25: null, p50: null, p75: null, p95: null });
		expect(none.outside).toEqual({ below: 0, above: 0, judged: 0, share: null });
		const one = await tx((t) => distribution(t, shopId, { measurement: 'clearance', family: 'TEST-4', side: 'exhaust', stage: 'final' }));
		expect([one.n, one.mean, one.sd, one.quantiles.p50, one.mad]).toEqual([1, 0.05, null, 0.05, 0]);
		const same = await tx((t) => distribution(t, shopId, { measurement: 'seat_runout', family: 'TEST-4', side: 'intake', stage: 'as_received' }));
		expect([same.n, same.sd, same.mad, same.iqr, same.tukeyOutside]).toEqual([4, 0, 0, 0, 0]);
		expect(same.histogram).toEqual([{ x0: 0.02, x1: 0.02, count: 4 }]);
		for (const d of [none, one, same]) expect(JSON.stringify(d)).not.toMatch(/NaN|Infinity/);
	});

	it('an unknown family is a 404 that lists the known ones', async () => {
		await expect(tx((t) => distribution(t, shopId, { measurement: 'clearance', family: 'NOPE-1' }))).rejects.toMatchObject({
			status: 404,
			body: { message: 'No engine family "NOPE-1" in this shop. Families: TEST-4, TEST-6.' }
		});
		// Codes match regardless of case when only one family fits.
		expect((await tx((t) => distribution(t, shopId, { ...clearanceAI, family: 'test-4' }))).n).toBe(10);
	});
});

describe('compare', () => {
	it('one summary per family, sorted by median', async () => {
		const c = await tx((t) => compare(t, shopId, { measurement: 'clearance', side: 'intake', stage: 'as_received' }));
		expect(c.families.map((f) => [f.family.code, f.n])).toEqual([
			['TEST-4', 10],
			['TEST-6', 4]
		]);
		expect(c.families[0].quantiles.p50).toBeCloseTo(0.051, 15);
		expect(c.families[1].quantiles.p50).toBeCloseTo(0.115, 15); // 0.06 0.11 0.12 0.13 → (0.11 + 0.12)/2
		expect(c.families[1].limits).toEqual({ min: null, max: 0.1, effectiveFrom: '2025-01-01' });
		expect(c.families[1].outside).toMatchObject({ above: 3, judged: 4 });
	});
});

describe('check', () => {
	const q = (value: number, over: Partial<CheckQuery> = {}): CheckQuery => ({ family: 'TEST-4', side: 'intake', stage: 'as_received', measurement: 'clearance', value, ...over });

	it('a clearance over the service limit: which limit, rank, robust z, Tukey flag, replace the guide', async () => {
		const c = await tx((t) => checkReading(t, shopId, q(0.12)));
		expect(c.withinLimits).toBe(false);
		expect(c.broken).toBe('max');
		expect(c.limits).toEqual({ min: null, max: 0.09, effectiveFrom: '2026-02-01' });
		expect(c.percentile).toBe(90); // nine of the ten below 0.12, none equal
		expect(c.robustZ).toBeCloseTo((0.6745 * (0.12 - 0.051)) / 0.007, 12); // Iglewicz & Hoaglin
		expect(c.tukey).toBe('high');
		expect(c.reasons.map((r) => r.code)).toEqual(['above_limit', 'tukey_high', 'modified_z']);
		expect(c.suggestion.decision).toBe('replace_guide');
		expect(c.fleet).toMatchObject({ n: 10 });
		expect(c.caution).toMatch(/engine maker/);
	});

	it('within service but over the rework limit → knurl; well inside → nothing; mid-rank for ties', async () => {
		expect((await tx((t) => checkReading(t, shopId, q(0.07)))).suggestion.decision).toBe('knurl_guide');
		const fine = await tx((t) => checkReading(t, shopId, q(0.05)));
		expect([fine.withinLimits, fine.broken, fine.suggestion.decision, fine.tukey]).toEqual([true, null, null, null]);
		expect(fine.percentile).toBe(50); // four below, one equal, mid-rank: (4 + (1 + 1)/2)/10
	});

	it('converts inches exactly (0.004 in = 0.1016 mm) and refuses a unit that does not fit', async () => {
		const c = await tx((t) => checkReading(t, shopId, q(0.004, { unit: 'in' })));
		expect([c.value, c.entered]).toEqual([0.1016, { value: 0.004, unit: 'in' }]);
		await expect(tx((t) => checkReading(t, shopId, q(5, { unit: 'pct' })))).rejects.toMatchObject({ status: 400 });
		await expect(tx((t) => checkReading(t, shopId, q(0.05, { family: 'NOPE' })))).rejects.toMatchObject({ status: 404 });
	});

	it('all fleet values equal: MAD 0, so no robust z (null, not Infinity)', async () => {
		const c = await tx((t) => checkReading(t, shopId, q(0.03, { measurement: 'seat_runout' })));
		expect(c.robustZ).toBeNull();
		expect(c.fleet.mad).toBe(0);
		expect(c.tukey).toBe('high'); // fences are 0.02 and 0.02
		expect(c.withinLimits).toBeNull(); // no seat runout limits in this shop
	});
});

describe('outliers', () => {
	const oq = { ...clearanceAI, page: 1, pageSize: 50, sort: '-value' as const };

	it('every reason, judged by the limits of the reading day (0.095 in January was inside 0.10)', async () => {
		const o = await tx((t) => outliers(t, shopId, oq));
		expect(o.total).toBe(2);
		expect(o.items.map((i) => [i.value, i.reasons.map((r) => r.code)])).toEqual([
			[0.15, ['above_limit', 'tukey_high', 'modified_z']],
			[0.095, ['tukey_high', 'modified_z']]
		]);
		expect(o.items[0].limits).toEqual({ min: null, max: 0.09, effectiveFrom: '2026-02-01' });
		expect(o.items[1].limits).toEqual({ min: null, max: 0.1, effectiveFrom: '2025-01-01' });
		expect(o.items[1].modifiedZ).toBeCloseTo((0.6745 * 0.044) / 0.007, 12);
		expect(o.groups).toHaveLength(1);
		expect(o.groups[0]).toMatchObject({ family: { code: 'TEST-4' }, side: 'intake', stage: 'as_received', n: 10 });
		expect(o.groups[0].median).toBeCloseTo(0.051, 15);
	});

	it('pages and sorts', async () => {
		const p2 = await tx((t) => outliers(t, shopId, { ...oq, pageSize: 1, page: 2 }));
		expect([p2.total, p2.pages, p2.items.map((i) => i.value)]).toEqual([2, 2, [0.095]]);
		const p3 = await tx((t) => outliers(t, shopId, { ...oq, pageSize: 1, page: 3 }));
		expect([p3.total, p3.items]).toEqual([2, []]);
		const asc = await tx((t) => outliers(t, shopId, { ...oq, sort: 'measuredAt' }));
		expect(asc.items.map((i) => i.value)).toEqual([0.095, 0.15]); // 18 January, then 19 February
		const byZ = await tx((t) => outliers(t, shopId, { ...oq, sort: '-z' }));
		expect(byZ.items[0].value).toBe(0.15);
	});
});

describe('rates', () => {
	it('positions over the limit by side: Miettinen–Nurminen z² = X²·(N − 1)/N on the tea table, Wilson intervals', async () => {
		const r = await tx((t) => rates(t, shopId, { check: { kind: 'measurement', measurement: 'clearance' }, family: 'TEST-6' }));
		expect(r.check).toEqual({ kind: 'measurement', measurement: 'clearance', stage: 'as_received', stageDefaulted: true });
		expect(r.bySide.intake).toMatchObject({ failures: 3, n: 4, rate: 0.75 });
		expect(r.bySide.exhaust).toMatchObject({ failures: 1, n: 4, rate: 0.25 });
		const w = wilson(3, 4);
		expect(r.bySide.intake.ci95).toEqual({ low: w.low, high: w.high });
		// [[3, 1], [1, 3]]: Pearson X² = 2 (docs/REFERENCES.md B3), so the Miettinen–Nurminen z at 0
		// is √(2 · 7/8) = 1.3229 and p = erfc(z/√2) = 0.18588 [C]; the interval contains 0.
		expect(r.sideDifference?.method).toBe('miettinen_nurminen');
		expect(r.sideDifference?.statistic).toBeCloseTo(Math.sqrt(1.75), 12);
		expect(r.sideDifference?.p).toBeCloseTo(0.185877, 6);
		expect(r.sideDifference?.verdict).toBe('not_clearly_different');
		expect(r.sideDifference?.difference).toBe(0.5);
		expect(r.byCylinder.filter((c) => c.side === 'intake').map((c) => [c.cylinder, c.failures, c.n])).toEqual([
			[1, 0, 1],
			[2, 1, 1],
			[3, 1, 1],
			[4, 1, 1]
		]);
	});

	it('judges each reading by the limits of its day (A intake: only 0.15 in February fails)', async () => {
		const r = await tx((t) => rates(t, shopId, { check: { kind: 'measurement', measurement: 'clearance' }, family: 'TEST-4', side: 'intake' }));
		expect(r.overall).toMatchObject({ failures: 1, n: 10 });
		expect(r.bySide.exhaust.n).toBe(0);
		expect(r.sideDifference).toBeNull();
	});

	it('counts a valve position once, judges it by the limits of each reading’s UTC day, and skips readings before any limits', async () => {
		const own = await makeShop(db, 'stats-rates');
		const at = (iso: string) => new Date(iso);
		const r = await withShop(db, own.shop.id, async (t) => {
			const [h] = await t.insert(heads).values({ shopId: own.shop.id, familyId: own.family.id, serial: 'R-1', receivedOn: '2026-01-02' }).returning();
			const row = (cylinder: number, valve: number, value: number, measuredAt: string): NewReading => ({
				...base({}),
				shopId: own.shop.id,
				familyId: own.family.id,
				headId: h.id,
				cylinder,
				valve,
				value,
				measuredAt: at(measuredAt)
			});
			await t.insert(limits).values([
				{ shopId: own.shop.id, familyId: own.family.id, measurement: 'clearance', side: 'intake', stage: 'as_received', min: null, max: 0.1, effectiveFrom: '2026-02-01' },
				{ shopId: own.shop.id, familyId: own.family.id, measurement: 'clearance', side: 'intake', stage: 'as_received', min: null, max: 0.08, effectiveFrom: '2026-03-01' }
			]);
			await t.insert(readings).values([
				row(1, 1, 0.5, '2026-01-15T10:00:00Z'), // before any limits: not judged, not counted
				row(1, 2, 0.05, '2026-02-10T10:00:00Z'), // one position, two readings, the second over 0.10
				row(1, 2, 0.12, '2026-02-20T10:00:00Z'),
				row(2, 1, 0.09, '2026-02-28T23:59:00Z'), // under 0.10, the last minute of February
				row(2, 2, 0.09, '2026-03-01T00:00:00Z'), // over 0.08 from the first instant of March
				row(3, 1, 0.09, '2026-02-28T23:30:00Z'), // within the limits of each day
				row(3, 1, 0.07, '2026-03-02T10:00:00Z')
			]);
			return rates(t, own.shop.id, { check: { kind: 'measurement', measurement: 'clearance' } });
		});
		expect(r.overall).toMatchObject({ failures: 2, n: 4 });
		expect(r.byCylinder.map((c) => [c.side, c.cylinder, c.failures, c.n])).toEqual([
			['intake', 1, 1, 1],
			['intake', 2, 1, 2],
			['intake', 3, 0, 1]
		]);
	});

	it('decision rates: 15 of 148 positions (Newcombe 1998 Table I: Wilson 0.0624–0.1605), chi-square for the sides', async () => {
		await tx(async (t) => {
			const hs = await t
				.insert(heads)
				.values(Array.from({ length: 10 }, (_, i) => ({ shopId, familyId: A, serial: `D-${i + 1}`, receivedOn: '2026-05-01' })))
				.returning();
			const positions = hs.flatMap((h) =>
				[1, 2, 3, 4].flatMap((cylinder) => (['intake', 'exhaust'] as const).flatMap((side) => [1, 2].map((valve) => ({ headId: h.id, cylinder, side, valve }))))
			);
			const intake = positions.filter((p) => p.side === 'intake').slice(0, 74);
			const exhaust = positions.filter((p) => p.side === 'exhaust').slice(0, 74);
			await t.execute(raw`select 1`);
			const rows = [
				...intake.map((p, i) => ({ ...p, kind: i < 10 ? 'replace_guide' : 'lap' })),
				...exhaust.map((p, i) => ({ ...p, kind: i < 5 ? 'replace_guide' : 'lap' }))
			];
			for (const r of rows) {
				await t.execute(raw`insert into decisions (shop_id, head_id, cylinder, side, valve, kind)
					values (${shopId}, ${r.headId}, ${r.cylinder}, ${r.side}::side, ${r.valve}, ${r.kind}::decision_kind)`);
			}
		});
		const r = await tx((t) => rates(t, shopId, { check: { kind: 'decision', decision: 'replace_guide' }, family: 'TEST-4' }));
		expect(r.overall).toMatchObject({ failures: 15, n: 148 });
		expect(r.overall.ci95.low).toBeCloseTo(0.0624, 4);
		expect(r.overall.ci95.high).toBeCloseTo(0.1605, 4);
		// Pearson's X² = N(ad − bc)²/(r1·r2·c1·c2) = 148·(10·69 − 64·5)²/(74·74·15·133) (by hand);
		// the Miettinen–Nurminen z² at 0 is X²·(N − 1)/N (Miettinen & Nurminen 1985).
		const x2 = (148 * (10 * 69 - 64 * 5) ** 2) / (74 * 74 * 15 * 133);
		expect(r.sideDifference?.statistic ?? 0).toBeCloseTo(Math.sqrt((x2 * 147) / 148), 12);
		expect(x2).toBeCloseTo(chiSquare2x2([[10, 64], [5, 69]]).statistic as number, 12);
		expect(r.sideDifference?.verdict).toBe('not_clearly_different');
	});

	it('comebacks: released heads of A that came back (1 of 2)', async () => {
		const c = await tx((t) => comebacks(t, shopId, {}));
		expect(c.families.map((f) => [f.family.code, f.failures, f.n])).toEqual([['TEST-4', 1, 2]]);
		expect(c.overall.ci95).toEqual({ low: wilson(1, 2).low, high: wilson(1, 2).high });
		const south = await tx((t) => comebacks(t, shopId, { customer: 'South Garage' }));
		expect(south.overall).toMatchObject({ failures: 0, n: 1 });
	});
});

describe('capability, control chart and wear', () => {
	it('capability of the final clearances against the final limits in force equals capability() of the same series', async () => {
		const c = await tx((t) => capabilityStudy(t, shopId, { family: 'TEST-4', side: 'intake', measurement: 'clearance', stage: 'final' }));
		const want = capability(FINAL, { lsl: 0.025, usl: 0.065 });
		expect(c).toMatchObject({ ...want, limits: { min: 0.025, max: 0.065, effectiveFrom: '2025-01-01' } });
		const ada = await tx((t) => capabilityStudy(t, shopId, { family: 'TEST-4', side: 'intake', measurement: 'clearance', stage: 'final', machinist: 'Ada Test' }));
		expect(ada).toMatchObject(capability(FINAL.slice(0, 4), { lsl: 0.025, usl: 0.065 }));
	});

	it('control chart in time order, and only the most recent readings with a limit', async () => {
		const c = await tx((t) => control(t, shopId, { family: 'TEST-4', side: 'intake', measurement: 'clearance', stage: 'final', limit: 1000 }));
		const want = controlChart(FINAL.map((value, i) => ({ t: i, value })));
		expect(c.points.map((p) => p.value)).toEqual(FINAL);
		expect([c.centre, c.ucl, c.lcl, c.mrBar, c.mrUcl, c.total]).toEqual([want.centre, want.ucl, want.lcl, want.mrBar, want.mrUcl, 8]);
		const last = await tx((t) => control(t, shopId, { family: 'TEST-4', side: 'intake', measurement: 'clearance', stage: 'final', limit: 5 }));
		expect([last.n, last.total, last.points.map((p) => p.value)]).toEqual([5, 8, FINAL.slice(3)]);
	});

	it('wear: a straight line 0.01 + 0.002 mm per 10,000 km comes back exactly, r² = 1', async () => {
		const w = await tx((t) => wear(t, shopId, { measurement: 'face_runout', stage: 'as_received', family: 'TEST-4', side: 'exhaust' }));
		expect(w.n).toBe(12);
		expect(w.slopePer10000Km).toBeCloseTo(0.002, 12);
		expect(w.intercept).toBeCloseTo(0.01, 12);
		expect(w.r2).toBeCloseTo(1, 12);
		expect(w.band).toHaveLength(41);
		expect(w.band[0].x).toBe(100_000);
		expect(w.band[40].x).toBe(300_000);
		expect([w.sampled, w.points.length]).toEqual([false, 12]);
	});

	it('wear: more than 5,000 points are sampled, the same way every time', async () => {
		const [hb] = await tx((t) => t.execute<{ id: string }>(raw`select id from heads where serial = 'B-1' and shop_id = ${shopId}`));
		await tx((t) =>
			t.insert(readings).values(
				Array.from({ length: 5001 }, (_, i) => base({ headId: hb.id, familyId: B, side: 'exhaust', measurement: 'margin', value: 1 + (i % 50) / 100, measuredAt: new Date(Date.UTC(2026, 5, 1, 0, 0, i)) }))
			)
		);
		const q = { measurement: 'margin', stage: 'as_received', family: 'TEST-6' } as const;
		const [a, b] = [await tx((t) => wear(t, shopId, q)), await tx((t) => wear(t, shopId, q))];
		expect([a.n, a.sampled, a.points.length]).toEqual([5001, true, 5000]);
		expect(a.points).toEqual(b.points);
		expect(a.slopePer10000Km).toBeNull(); // one head, one mileage: no line
	});
});

describe('describe', () => {
	it('is describe() plus the count beyond the fences', () => {
		const d = describeValues(V);
		expect(d).toMatchObject(describeStats(V));
		expect(d.tukeyOutside).toBe(2);
	});
});
