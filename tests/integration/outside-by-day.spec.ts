// Readings outside the limits of their day: the distribution and compare answers judge each
// reading by the limit version in force on the UTC day it was measured, from the per-month value
// counts where a whole month lies inside one version and from readings where a version starts in
// the middle of a month, and give the same counts as reading every reading, and as the rates
// answer gives for the same valve positions. Expected counts by hand, beside each reading.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { heads, limits, readings } from '../../src/lib/server/db/schema';
import { compare, distribution, rates } from '../../src/lib/server/services/stats';
import { makeShop, raw, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;
const tx = <T>(work: (t: Parameters<Parameters<typeof withShop>[2]>[0]) => Promise<T>) => withShop(db, shopId, work);

// TEST-4 exhaust clearance as received: 0.12 mm from 2025-01-01, tightened to 0.10 mm from
// Sunday 15 March 2026 (in the middle of a month), and a final-stage version from the 1st of
// April (on a month's first day) that must not split April.
// [value, measured at, outside the limits of its day?, outside today's (0.10)?]
const READINGS: [number, string, boolean, boolean][] = [
	[0.11, '2026-02-10T09:00:00Z', false, true], // February, wholly under 0.12
	[0.125, '2026-02-20T09:00:00Z', true, true],
	[0.11, '2026-03-10T09:00:00Z', false, true], // March before the 15th: 0.12
	[0.13, '2026-03-14T23:59:00Z', true, true], // the last minute under 0.12
	[0.11, '2026-03-15T00:00:00Z', true, true], // the first instant under 0.10
	[0.09, '2026-03-20T09:00:00Z', false, false],
	[0.105, '2026-04-02T09:00:00Z', true, true], // April, wholly under 0.10
	[0.095, '2026-04-03T09:00:00Z', false, false]
];

beforeAll(async () => {
	const own = await makeShop(db, 'outside-by-day');
	shopId = own.shop.id;
	const familyId = own.family.id;
	await tx(async (t) => {
		const [h] = await t.insert(heads).values({ shopId, familyId, serial: 'D-1', receivedOn: '2026-02-01' }).returning();
		await t.insert(limits).values([
			{ shopId, familyId, measurement: 'clearance', side: 'exhaust', stage: 'as_received', max: 0.12, effectiveFrom: '2025-01-01' },
			{ shopId, familyId, measurement: 'clearance', side: 'exhaust', stage: 'as_received', max: 0.1, effectiveFrom: '2026-03-15' },
			{ shopId, familyId, measurement: 'clearance', side: 'exhaust', stage: 'final', min: 0.04, max: 0.08, effectiveFrom: '2026-04-01' }
		]);
		// One valve position per reading (cylinder × valve), so readings and positions agree.
		await t.insert(readings).values(
			READINGS.map(([value, at], i) => ({
				shopId,
				headId: h.id,
				familyId,
				stage: 'as_received' as const,
				cylinder: 1 + (i >> 1),
				side: 'exhaust' as const,
				valve: 1 + (i % 2),
				measurement: 'clearance' as const,
				value,
				measuredAt: new Date(at),
				measuredBy: 'Ada Test'
			}))
		);
	});
});
afterAll(() => sql.end());

const q = { measurement: 'clearance', family: 'TEST-4', side: 'exhaust', stage: 'as_received' } as const;

describe('readings outside the limits of their day', () => {
	it('a limit change on 15 March judges March by day: 4 of 8 outside, 6 of 8 against today’s 0.10', async () => {
		const d = await tx((t) => distribution(t, shopId, q));
		// March is read from readings (a version starts inside it), every other month from the summaries.
		expect(d.source).toBe('summaries+readings');
		expect(d.n).toBe(8);
		expect(d.outside).toEqual({ below: 0, above: 4, judged: 8, share: 0.5 });
		expect(d.outsideAsOf).toEqual({ below: 0, above: 6, judged: 8, share: 0.75 });
		expect(d.limits).toEqual({ min: null, max: 0.1, effectiveFrom: '2026-03-15' });
		// Reading every reading gives the same.
		const direct = await tx((t) => distribution(t, shopId, q, { source: 'readings' }));
		expect(direct.outside).toEqual(d.outside);
		expect(direct.outsideAsOf).toEqual(d.outsideAsOf);
	});

	it('whole months and the split month together, with dates: February to April, and edges inside March', async () => {
		const whole = await tx((t) => distribution(t, shopId, { ...q, from: '2026-02-01', to: '2026-04-30' }));
		expect(whole.source).toBe('summaries+readings');
		expect(whole.outside).toEqual({ below: 0, above: 4, judged: 8, share: 0.5 });
		// 12 March to 2 April: 0.13 (out), 0.11 on the 15th (out), 0.09, 0.105 (out) → 3 of 4.
		const edges = await tx((t) => distribution(t, shopId, { ...q, from: '2026-03-12', to: '2026-04-02' }));
		expect(edges.n).toBe(4);
		expect(edges.outside).toEqual({ below: 0, above: 3, judged: 4, share: 0.75 });
		// Limits as of the range's last day (2 April: 0.10): 0.13, 0.11, 0.105 → 3 of 4.
		expect(edges.outsideAsOf).toMatchObject({ above: 3, judged: 4 });
		// March alone, before the change (1–14 March): by 0.12 only 0.13 is out; by the 0.12 in
		// force on the 14th the same.
		const before = await tx((t) => distribution(t, shopId, { ...q, from: '2026-03-01', to: '2026-03-14' }));
		expect(before.outside).toEqual({ below: 0, above: 1, judged: 2, share: 0.5 });
		expect(before.outsideAsOf).toEqual({ below: 0, above: 1, judged: 2, share: 0.5 });
	});

	it('compare and rates give the same count for the same selection', async () => {
		const c = await tx((t) => compare(t, shopId, { measurement: 'clearance', side: 'exhaust', stage: 'as_received' }));
		expect(c.families).toHaveLength(1);
		expect(c.families[0].outside).toEqual({ below: 0, above: 4, judged: 8, share: 0.5 });
		const r = await tx((t) => rates(t, shopId, { check: { kind: 'measurement', measurement: 'clearance' }, family: 'TEST-4', side: 'exhaust', stage: 'as_received' }));
		expect(r.overall).toMatchObject({ failures: 4, n: 8, rate: 0.5 });
	});

	it('readings before the first version are not judged (nor counted as judged)', async () => {
		// Only the final-stage version exists for final readings, from 1 April: a reading in March
		// has no limits of its day.
		await tx(async (t) => {
			const [h] = await t.execute<{ id: string; family_id: string }>(raw`select id, family_id from heads where shop_id = ${shopId} and serial = 'D-1'`);
			await t.insert(readings).values(
				[
					[0.09, '2026-03-20T09:00:00Z'], // no version yet: not judged
					[0.09, '2026-04-20T09:00:00Z'] // over 0.08: outside
				].map(([value, at], i) => ({
					shopId,
					headId: h.id,
					familyId: h.family_id,
					stage: 'final' as const,
					cylinder: 1 + i,
					side: 'exhaust' as const,
					valve: 1,
					measurement: 'clearance' as const,
					value: value as number,
					measuredAt: new Date(at as string),
					measuredBy: 'Ada Test'
				}))
			);
		});
		const fin = await tx((t) => distribution(t, shopId, { ...q, stage: 'final' }));
		expect(fin.n).toBe(2);
		expect(fin.outside).toEqual({ below: 0, above: 1, judged: 1, share: 1 });
		expect(fin.outsideAsOf).toEqual({ below: 0, above: 2, judged: 2, share: 1 });
	});
});
