// Row-level security is the second line of defence: a query that forgets its shop filter still
// sees only the active shop's rows, and cannot write into another shop.
import { sql as raw } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { heads, readings } from '../../src/lib/server/db/schema';
import { makeShop, pgError, testDb } from '../helpers/db';

const { db, sql } = testDb();
let a: Awaited<ReturnType<typeof makeShop>>;
let b: Awaited<ReturnType<typeof makeShop>>;
let headB: string;

beforeAll(async () => {
	a = await makeShop(db, 'rls-a');
	b = await makeShop(db, 'rls-b');
	for (const s of [a, b]) {
		await withShop(db, s.shop.id, async (tx) => {
			const [h] = await tx.insert(heads).values({ shopId: s.shop.id, familyId: s.family.id, serial: 'RLS-1', receivedOn: '2026-05-01' }).returning();
			await tx.insert(readings).values({ shopId: s.shop.id, headId: h.id, familyId: s.family.id, stage: 'as_received', cylinder: 1, side: 'intake', valve: 1, measurement: 'clearance', value: 0.05, measuredAt: new Date('2026-05-02T08:00:00Z'), measuredBy: 'RLS' });
			if (s === b) headB = h.id;
		});
	}
});
afterAll(() => sql.end());

describe('row-level security', () => {
	it('a deliberately unscoped query sees only the active shop', async () => {
		const rows = await withShop(db, a.shop.id, (tx) => tx.execute<{ shop_id: string }>(raw`select distinct shop_id from readings`));
		expect(rows.map((r) => r.shop_id)).toEqual([a.shop.id]);
		const h = await withShop(db, a.shop.id, (tx) => tx.execute(raw`select * from heads where id = ${headB}`));
		expect(h).toHaveLength(0);
	});

	it('without any shop set, nothing is visible', async () => {
		const rows = await db.execute<{ n: number }>(raw`select count(*)::int as n from readings`);
		expect(rows[0].n).toBe(0);
	});

	it('cannot update or delete another shop’s rows, even by id', async () => {
		const updated = await withShop(db, a.shop.id, (tx) => tx.execute(raw`update heads set customer = 'x' where id = ${headB}`));
		expect(updated.count).toBe(0);
		const deleted = await withShop(db, a.shop.id, (tx) => tx.execute(raw`delete from readings where head_id = ${headB}`));
		expect(deleted.count).toBe(0);
		const still = await withShop(db, b.shop.id, (tx) => tx.execute<{ n: number }>(raw`select count(*)::int as n from readings`));
		expect(still[0].n).toBe(1);
	});

	it('cannot insert a row for another shop', async () => {
		const err = await pgError(() =>
			withShop(db, a.shop.id, (tx) => tx.insert(heads).values({ shopId: b.shop.id, familyId: b.family.id, serial: 'SNEAK', receivedOn: '2026-05-01' }))
		);
		expect(err.code).toBe('42501');
	});
});
