// The overview's figures against the database: positions outside limits as received follow every
// change of the readings and the limits (the answer is cached per shop behind a fingerprint of
// both), judged by the limit version of each reading's day.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { withShop } from '../../src/lib/server/db/scope';
import { heads, limits, readings } from '../../src/lib/server/db/schema';
import { overviewFigures } from '../../src/lib/server/services/overview';
import { makeShop, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;
let familyId: string;
let headId: string;

const figures = () => withShop(db, shopId, (tx) => overviewFigures(tx, shopId, { withImports: true }));
const side = async (s: 'intake' | 'exhaust') => (await figures()).failingAsReceived.find((r) => r.side === s);

function reading(cylinder: number, s: 'intake' | 'exhaust', value: number, day: string, measurement: 'clearance' | 'seat_runout' = 'clearance') {
	return { shopId, headId, familyId, stage: 'as_received' as const, cylinder, side: s, valve: 1, measurement, value, measuredAt: new Date(`${day}T10:00:00Z`), measuredBy: 'Ada Test' };
}

beforeAll(async () => {
	const ctx = await makeShop(db, 'overview');
	shopId = ctx.shop.id;
	familyId = ctx.family.id;
	await withShop(db, shopId, async (tx) => {
		const [h] = await tx.insert(heads).values({ shopId, familyId, serial: 'OV-1', receivedOn: '2026-03-01' }).returning();
		headId = h.id;
		await tx.insert(limits).values([
			// Clearance: at most 0.10 until May, then at most 0.08 (a stricter version).
			{ shopId, familyId, measurement: 'clearance', side: 'intake', stage: 'as_received', max: 0.1, effectiveFrom: '2026-01-01' },
			{ shopId, familyId, measurement: 'clearance', side: 'intake', stage: 'as_received', max: 0.08, effectiveFrom: '2026-05-01' },
			{ shopId, familyId, measurement: 'clearance', side: 'exhaust', stage: 'as_received', max: 0.1, effectiveFrom: '2026-01-01' }
		]);
		await tx.insert(readings).values([
			reading(1, 'intake', 0.09, '2026-03-02'), // inside 0.10 (its day's version)
			reading(2, 'intake', 0.09, '2026-06-02'), // outside 0.08 (its day's version)
			reading(1, 'exhaust', 0.05, '2026-03-02'),
			reading(1, 'exhaust', 0.2, '2026-03-02', 'seat_runout'), // no limit for seat runout: not judged
			// A position with only readings that have no limits is not judged, so not counted (as rates).
			reading(3, 'exhaust', 0.2, '2026-03-02', 'seat_runout')
		]);
	});
});
afterAll(() => sql.end());

describe('positions outside limits as received', () => {
	it('judges each reading by the limit version of its day, one count per valve position', async () => {
		expect(await side('intake')).toMatchObject({ positions: 2, failing: 1, share: 0.5 });
		expect(await side('exhaust')).toMatchObject({ positions: 1, failing: 0, share: 0 });
		const f = await figures();
		expect(f.readingsStored).toBe(5);
		// Wilson (1927) 95 % interval for 1 of 2, worked by hand from the formula: centre 0.5,
		// half-width 1.96·√(0.25/2 + 3.8416/16)/(1 + 3.8416/2) = 0.4055, so 0.0945 to 0.9055 (the same as
		// R's prop.test(1, 2, correct = FALSE), from memory).
		const intake = f.failingAsReceived.find((r) => r.side === 'intake')!;
		expect(intake.ci95.low).toBeCloseTo(0.0945, 4);
		expect(intake.ci95.high).toBeCloseTo(0.9055, 4);
	});

	it('follows a new reading, an edited value and a deleted one at once, not when a cache runs out', async () => {
		await withShop(db, shopId, (tx) => tx.insert(readings).values(reading(2, 'exhaust', 0.15, '2026-03-02')));
		expect(await side('exhaust')).toMatchObject({ positions: 2, failing: 1 });
		await withShop(db, shopId, (tx) =>
			tx.update(readings).set({ value: 0.06 }).where(and(eq(readings.headId, headId), eq(readings.side, 'exhaust'), eq(readings.cylinder, 2)))
		);
		expect(await side('exhaust')).toMatchObject({ positions: 2, failing: 0 });
		await withShop(db, shopId, (tx) => tx.delete(readings).where(and(eq(readings.headId, headId), eq(readings.side, 'exhaust'), eq(readings.cylinder, 2))));
		expect(await side('exhaust')).toMatchObject({ positions: 1, failing: 0 });
	});

	it('follows a change of the limits', async () => {
		await withShop(db, shopId, (tx) =>
			tx.update(limits).set({ max: 0.1 }).where(and(eq(limits.familyId, familyId), eq(limits.side, 'intake'), eq(limits.effectiveFrom, '2026-05-01')))
		);
		expect(await side('intake')).toMatchObject({ positions: 2, failing: 0 });
	});
});
