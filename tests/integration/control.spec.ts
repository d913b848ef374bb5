// Control charts against the real database: limits held from a baseline whatever window is
// charted, a recomputed baseline stored and audited, another shop kept out of both, and the
// monthly tallies of the p-chart judged by the limits of each reading's day (counted by hand).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShop, withSystem } from '../../src/lib/server/db/scope';
import { auditLog, controlBaselines, heads, limits, readings, users } from '../../src/lib/server/db/schema';
import { seriesKey } from '../../src/lib/server/db/series';
import { monthlyPositionTallies } from '../../src/lib/server/queries/stats';
import { control, pchart, recomputeBaseline } from '../../src/lib/server/services/stats';
import { isDomainError } from '../../src/lib/server/errors';
import { makeShop, pgError, raw, testDb } from '../helpers/db';
import { uniqueEmail } from '../helpers/people';

const { db, sql } = testDb();
let shopA: string;
let shopB: string;
let famA: string;
let famB: string;
let headA: string;

type Tx = Parameters<Parameters<typeof withShop>[2]>[0];
const inA = <T>(work: (t: Tx) => Promise<T>) => withShop(db, shopA, work);
const inB = <T>(work: (t: Tx) => Promise<T>) => withShop(db, shopB, work);
const who = { userId: '', label: '', name: 'Eve Engineer' };

/** 1,200 final intake clearances of one position, one an hour from 2025-01-01 00:00 UTC: 0.040 + 0.001·(7i mod 13). */
const N = 1200;
const valueOf = (i: number) => Number((0.04 + 0.001 * ((7 * i) % 13)).toFixed(3));
const at = (i: number) => new Date(Date.UTC(2025, 0, 1, i));
const Q = { family: 'TEST-4', side: 'intake', measurement: 'clearance', stage: 'final' } as const;

beforeAll(async () => {
	const a = await makeShop(db, 'control-a');
	const b = await makeShop(db, 'control-b');
	[shopA, famA, shopB, famB] = [a.shop.id, a.family.id, b.shop.id, b.family.id];
	who.label = uniqueEmail('control-engineer');
	const [u] = await withSystem(db, (t) => t.insert(users).values({ email: who.label }).returning());
	who.userId = u.id;
	await inA(async (t) => {
		const [h] = await t.insert(heads).values({ shopId: shopA, familyId: famA, serial: 'C-1', receivedOn: '2024-12-30' }).returning();
		headA = h.id;
		const rows = Array.from({ length: N }, (_, i) => ({ shopId: shopA, headId: h.id, familyId: famA, stage: 'final' as const, cylinder: 1, side: 'intake' as const, valve: 1, measurement: 'clearance' as const, value: valueOf(i), measuredAt: at(i), measuredBy: 'Ada Test' }));
		for (let i = 0; i < rows.length; i += 400) await t.insert(readings).values(rows.slice(i, i + 400));
	});
});
afterAll(() => sql.end());

describe('limits from a baseline, held whatever window is charted', () => {
	it('limit=1000 and limit=500 give the same centre and limits: the first 100 readings of the series', async () => {
		const wide = await inA((t) => control(t, shopA, { ...Q, limit: 1000 }));
		const narrow = await inA((t) => control(t, shopA, { ...Q, limit: 500 }));
		expect([wide.n, narrow.n, wide.total]).toEqual([1000, 500, 1200]);
		for (const k of ['centre', 'ucl', 'lcl', 'mrBar', 'mrUcl'] as const) expect(narrow[k]).toBe(wide[k]);
		expect(narrow.baseline).toEqual(wide.baseline);
		// [C] The first 100 values: 0.040 + 0.001·(7i mod 13), i = 0…99. Seven full cycles of 13
		// (sum of 0…12 = 78 each) and i = 91…99 giving 0, 7, 1, 8, 2, 9, 3, 10, 4 (sum 44):
		// mean = 0.040 + 0.001·(7·78 + 44)/100 = 0.0459. Consecutive steps are +7 or −6 (mod 13):
		// |MR| is 0.007 or 0.006; of the 99 steps 7i mod 13 rises (+7) while the value is 0…5 and
		// falls (−6) while it is 6…12.
		expect(wide.baseline).toMatchObject({ source: 'default', n: 100, from: '2025-01-01', to: '2025-01-05', setAt: null, setBy: null });
		expect(wide.centre as number).toBeCloseTo(0.0459, 12);
		const first = Array.from({ length: 100 }, (_, i) => valueOf(i));
		const mrBar = first.slice(1).reduce((s, v, i) => s + Math.abs(v - first[i]), 0) / 99;
		expect(wide.mrBar as number).toBeCloseTo(mrBar, 12);
		expect(wide.ucl as number).toBeCloseTo(0.0459 + 2.66 * mrBar, 12);
		expect(wide.lcl as number).toBeCloseTo(0.0459 - 2.66 * mrBar, 12);
		expect([wide.lclClipped, wide.uclClipped, wide.bounds]).toEqual([false, false, { min: 0, max: null }]);
	});

	it('dates are instants in time order, and the rules asked for are listed by rule', async () => {
		const c = await inA((t) => control(t, shopA, { ...Q, limit: 30, rules: ['n3', 'n7'] }));
		expect(c.points[0].t).toBe('2025-02-18T18:00:00.000Z');
		expect(c.points[29].t).toBe('2025-02-19T23:00:00.000Z');
		expect(c.rules).toEqual(['n3', 'n7']);
		expect(c.ruleBreaks.map((b) => b.rule)).toEqual(['n3', 'n7']);
		// [C] The values step by +0.007 or −0.006 (7i mod 13), at most two rises in a row: no six
		// rising (Nelson 3). σ = MR̄/1.128 ≈ 0.0058 mm, so of the 13 values only 0.040 and 0.052 lie
		// beyond 1σ of 0.0459, and each comes once every 13 readings: no 15 in a row within 1σ (Nelson 7).
		expect(c.ruleBreaks.map((b) => b.points.length)).toEqual([0, 0]);
		expect(c.points.every((p) => p.rules.length === 0)).toBe(true);
		expect(c.ewma?.points).toHaveLength(30);
		expect(c.ewma?.lambda).toBe(0.2);
	});
});

describe('recompute from … to …', () => {
	it('refuses a period with too few readings and stores nothing', async () => {
		const err = await inA((t) => recomputeBaseline(t, shopA, who, { ...Q, from: '2024-01-01', to: '2024-12-31' })).catch((e) => e);
		expect(isDomainError(err) && err.status).toBe(422);
		expect(err.message).toBe('TEST-4 has 0 final intake stem-to-guide clearance readings from 2024-01-01 to 2024-12-31; a baseline needs at least 20. Choose a longer period.');
		const rows = await inA((t) => t.select().from(controlBaselines));
		expect(rows).toEqual([]);
	});

	it('stores the baseline of the period, writes an audit row, and the chart then uses it', async () => {
		// 2025-01-10 and 2025-01-11: hours 216…263, 48 readings.
		const b = await inA((t) => recomputeBaseline(t, shopA, who, { ...Q, from: '2025-01-10', to: '2025-01-11' }));
		const period = Array.from({ length: 48 }, (_, k) => valueOf(216 + k));
		const mean = period.reduce((s, v) => s + v, 0) / 48;
		expect(b).toMatchObject({ source: 'stored', from: '2025-01-10', to: '2025-01-11', n: 48, setBy: 'Eve Engineer' });
		expect(b.centre).toBeCloseTo(mean, 12);
		const c = await inA((t) => control(t, shopA, { ...Q, limit: 200 }));
		expect(c.baseline).toEqual(b);
		expect(c.centre).toBe(b.centre);
		const audits = await inA((t) => t.select().from(auditLog).where(raw`${auditLog.entity} = 'control_baseline'`));
		expect(audits).toHaveLength(1);
		expect(audits[0]).toMatchObject({ action: 'create', actorLabel: who.label, entityId: (await inA((t) => t.select().from(controlBaselines)))[0].id });
		expect(audits[0].after).toMatchObject({ family: 'TEST-4', measurement: 'clearance', stage: 'final', side: 'intake', from: '2025-01-10', to: '2025-01-11', n: 48 });

		// Again with another period: the one row is replaced, the audit row says what it was.
		await inA((t) => recomputeBaseline(t, shopA, who, { ...Q, from: '2025-01-10', to: '2025-01-12' }));
		const rows = await inA((t) => t.select().from(controlBaselines));
		expect(rows.map((r) => [r.fromDay, r.toDay, r.n])).toEqual([['2025-01-10', '2025-01-12', 72]]);
		const again = await inA((t) => t.select().from(auditLog).where(raw`${auditLog.entity} = 'control_baseline' and ${auditLog.action} = 'update'`));
		expect(again[0].before).toMatchObject({ from: '2025-01-10', to: '2025-01-11', n: 48 });
	});

	it('another shop neither reads nor sets it', async () => {
		// Shop B's TEST-4 has no readings: no baseline, and shop A's row is invisible.
		const c = await inB((t) => control(t, shopB, { ...Q, limit: 500 }));
		expect([c.baseline, c.centre, c.n]).toEqual([null, null, 0]);
		expect(await inB((t) => t.select().from(controlBaselines))).toEqual([]);
		const err = await inB((t) => recomputeBaseline(t, shopB, who, { ...Q, from: '2025-01-10', to: '2025-01-12' })).catch((e) => e);
		expect(err.status).toBe(422);
		// Writing a row for shop A from B's scope is refused by row-level security.
		const denied = await pgError(() =>
			inB((t) => t.insert(controlBaselines).values({ shopId: shopA, familyId: famA, measurement: 'clearance', stage: 'final', side: 'intake', fromDay: '2025-01-01', toDay: '2025-01-02', n: 2, centre: 1, mrBar: 0, setByLabel: 'x' }))
		);
		expect(denied.code).toBe('42501');
		// Nor can B point a row at A's family under its own shop (the same-shop key).
		const cross = await pgError(() =>
			inB((t) => t.insert(controlBaselines).values({ shopId: shopB, familyId: famA, measurement: 'clearance', stage: 'final', side: 'intake', fromDay: '2025-01-01', toDay: '2025-01-02', n: 2, centre: 1, mrBar: 0, setByLabel: 'x' }))
		);
		expect(cross.code).toBe('23503');
		const stillA = await inA((t) => t.select().from(controlBaselines));
		expect(stillA.map((r) => r.n)).toEqual([72]);
		void famB;
	});
});

describe('the latest readings charted', () => {
	it('limit=3 charts the last three readings in time order with their head, and counts all 1,200', async () => {
		// Readings 1197, 1198 and 1199: 2025-02-19 21:00, 22:00 and 23:00 UTC; 7i mod 13 = 7, 1 and 8.
		const c = await inA((t) => control(t, shopA, { ...Q, limit: 3 }));
		expect([c.n, c.total]).toEqual([3, 1200]);
		expect(c.points.map((p) => [p.t, p.value, p.serial])).toEqual([
			['2025-02-19T21:00:00.000Z', 0.047, 'C-1'],
			['2025-02-19T22:00:00.000Z', 0.041, 'C-1'],
			['2025-02-19T23:00:00.000Z', 0.048, 'C-1']
		]);
		// A filter on the heads counts in the total as in the points: no head of that customer.
		const none = await inA((t) => control(t, shopA, { ...Q, limit: 3, customer: 'Nobody Ltd' }));
		expect([none.n, none.total, none.points]).toEqual([0, 0, []]);
	});
});

describe('monthly tallies of positions outside the limits of their day (p-chart)', () => {
	it('counts each position once, in the month of its first reading, judged by the version of each reading’s day', async () => {
		await inA(async (t) => {
			await t.insert(limits).values([
				{ shopId: shopA, familyId: famA, measurement: 'seat_width', side: 'exhaust', stage: 'final', min: 1.0, max: 2.0, effectiveFrom: '2025-01-01' },
				// From 1 February a tighter maximum: January readings stay judged by 2.0.
				{ shopId: shopA, familyId: famA, measurement: 'seat_width', side: 'exhaust', stage: 'final', min: 1.0, max: 1.8, effectiveFrom: '2025-02-01' }
			]);
			const r = (cylinder: number, valve: number, value: number, day: string) => ({ shopId: shopA, headId: headA, familyId: famA, stage: 'final' as const, cylinder, side: 'exhaust' as const, valve, measurement: 'seat_width' as const, value, measuredAt: new Date(`${day}T09:00:00Z`), measuredBy: 'Bo Test' });
			await t.insert(readings).values([
				// January: 4 positions; 1.9 is inside January's 2.0, 0.9 is below 1.0 → 1 of 4.
				r(1, 1, 1.5, '2025-01-20'),
				r(1, 2, 1.9, '2025-01-20'),
				r(2, 1, 0.9, '2025-01-21'),
				r(2, 2, 1.4, '2025-01-21'),
				// A January position read again in February at 1.9 (outside February's 1.8): judged again
				// in February, where it fails; January keeps its own verdict → January 1 of 4.
				r(1, 1, 1.9, '2025-02-03'),
				// February: 3 positions judged by February's readings; two are outside 1.8 → 2 of 3.
				r(3, 1, 1.9, '2025-02-04'),
				r(3, 2, 1.7, '2025-02-04')
			]);
		});
		const sel = { familyIds: [famA], keys: [seriesKey('seat_width', 'final', 'exhaust')], from: null, to: null, machinist: null, customer: null, mileageMin: null, mileageMax: null };
		const tallies = await inA((t) => monthlyPositionTallies(t, shopA, sel));
		expect(tallies).toEqual([
			{ familyId: famA, month: '2025-01-01', n: 4, failures: 1 },
			{ familyId: famA, month: '2025-02-01', n: 3, failures: 2 }
		]);
		// [C] p̄ = 3/7 = 0.4286; n = 4: 0.4286 ± 3·√(0.4286·0.5714/4) = 0.4286 ± 0.7423 → 0 … 1;
		// n = 3: 0.4286 ± 0.8571 → 0 … 1 (clipped at both ends).
		const p = await inA((t) => pchart(t, shopA, { family: 'TEST-4', side: 'exhaust', measurement: 'seat_width', stage: 'final' }));
		expect(p).toMatchObject({ n: 7, failures: 3, side: 'exhaust' });
		expect(p.pBar).toBeCloseTo(3 / 7, 12);
		expect(p.months).toMatchObject([
			{ month: '2025-01', n: 4, failures: 1, p: 0.25, lcl: 0, ucl: 1, beyond: false },
			{ month: '2025-02', n: 3, failures: 2, lcl: 0, ucl: 1, beyond: false }
		]);
		expect(p.months[1].p).toBeCloseTo(2 / 3, 12);
		expect(await inB((t) => monthlyPositionTallies(t, shopB, { ...sel, familyIds: [famA] }))).toEqual([]);
	});
});
