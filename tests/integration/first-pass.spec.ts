// First-pass yield against the database: a head passes first time when no final reading was
// repeated (a retest is a second round) and every first final reading was within the limits of
// its day; the machinist is who took the head's first final reading.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { heads, limits, readings } from '../../src/lib/server/db/schema';
import { firstPass } from '../../src/lib/server/services/stats';
import { makeShop, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;

const yieldOf = (q: Parameters<typeof firstPass>[2] = {}) => withShop(db, shopId, (tx) => firstPass(tx, shopId, q));

beforeAll(async () => {
	const ctx = await makeShop(db, 'first-pass');
	shopId = ctx.shop.id;
	const familyId = ctx.family.id;
	await withShop(db, shopId, async (tx) => {
		const made = await tx
			.insert(heads)
			.values(['FP-1', 'FP-2', 'FP-3', 'FP-4', 'FP-5'].map((serial) => ({ shopId, familyId, serial, receivedOn: '2026-03-01' })))
			.returning();
		const id = (serial: string) => made.find((h) => h.serial === serial)!.id;
		await tx.insert(limits).values([
			{ shopId, familyId, measurement: 'clearance', side: 'intake', stage: 'final', min: 0.025, max: 0.065, effectiveFrom: '2025-01-01' },
			{ shopId, familyId, measurement: 'vacuum_hold', side: 'intake', stage: 'final', min: 90, effectiveFrom: '2025-01-01' }
		]);
		const r = (serial: string, measurement: 'clearance' | 'vacuum_hold' | 'seat_runout', value: number, at: string, by: string, stage: 'final' | 'as_received' = 'final') => ({
			shopId,
			headId: id(serial),
			familyId,
			stage,
			cylinder: 1,
			side: 'intake' as const,
			valve: 1,
			measurement,
			value,
			measuredAt: new Date(at),
			measuredBy: by
		});
		await tx.insert(readings).values([
			// FP-1: every final reading within its limits, none repeated: passes.
			r('FP-1', 'clearance', 0.04, '2026-03-02T09:00:00Z', 'Ada Test'),
			r('FP-1', 'vacuum_hold', 98, '2026-03-02T09:05:00Z', 'Ada Test'),
			// FP-2: the seal test failed (80 %), the valve was lapped again and passed at 11:00: a second round.
			r('FP-2', 'clearance', 0.04, '2026-03-02T10:00:00Z', 'Ada Test'),
			r('FP-2', 'vacuum_hold', 80, '2026-03-02T10:05:00Z', 'Ada Test'),
			r('FP-2', 'vacuum_hold', 97, '2026-03-02T11:00:00Z', 'Ada Test'),
			// FP-3: final clearance over its limit, never read again: fails the first pass.
			r('FP-3', 'clearance', 0.07, '2026-03-03T09:00:00Z', 'Bo Test'),
			// FP-4: seat runout has no final limit here: nothing to fail, passes.
			r('FP-4', 'seat_runout', 0.02, '2026-03-04T09:00:00Z', 'Bo Test'),
			// FP-5: only as received: no final check, not counted.
			r('FP-5', 'clearance', 0.09, '2026-03-02T09:00:00Z', 'Bo Test', 'as_received')
		]);
	});
});
afterAll(() => sql.end());

describe('first-pass yield', () => {
	it('counts heads with a final check, and those with no retest and no first reading outside limits (2 of 4)', async () => {
		const y = await yieldOf();
		expect(y.unit).toBe('head');
		expect(y.overall).toMatchObject({ heads: 4, passed: 2, rate: 0.5 });
		// Wilson (1927) 95 % interval for 2 of 4, z = 1.959964: centre 0.5, half-width
		// z·√(1/16 + z²/64)/(1 + z²/4) = 0.35000, so 0.1500 to 0.8500 (by hand from the formula)
		expect(y.overall.ci95.low).toBeCloseTo(0.15, 4);
		expect(y.overall.ci95.high).toBeCloseTo(0.85, 4);
		expect(y.families.map((f) => [f.family.code, f.heads, f.passed])).toEqual([['TEST-4', 4, 2]]);
		expect(y.byMachinist.map((m) => [m.machinist, m.heads, m.passed])).toEqual([
			['Ada Test', 2, 1],
			['Bo Test', 2, 1]
		]);
		expect(y.families[0].byMachinist).toEqual(y.byMachinist);
	});

	it('narrows by the machinist of the first final reading and by its day', async () => {
		const bo = await yieldOf({ machinist: 'bo test' });
		expect(bo.overall).toMatchObject({ heads: 2, passed: 1 });
		const day = await yieldOf({ from: '2026-03-04', to: '2026-03-04' });
		expect(day.overall).toMatchObject({ heads: 1, passed: 1, rate: 1 });
		expect(day.overall.ci95.high).toBe(1);
		const none = await yieldOf({ from: '2027-01-01' });
		expect(none.overall).toEqual({ heads: 0, passed: 0, rate: null, ci95: { low: null, high: null } });
		expect(none.families).toEqual([]);
	});

	it('refuses a family the shop does not have', async () => {
		await expect(yieldOf({ family: 'NOPE-1' })).rejects.toThrow(/No engine family "NOPE-1"/);
	});
});
