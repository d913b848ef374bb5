// Row-level security is the second line of defence: a query that forgets its shop filter still
// sees only the active shop's rows, and cannot write into another shop.
import { sql as raw } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { newApiToken, sha256Hex } from '../../src/lib/server/auth/tokens';
import { withShop, withSystem } from '../../src/lib/server/db/scope';
import { apiTokens, heads, importBatches, limits, memberships, readings, users } from '../../src/lib/server/db/schema';
import { CopyChannel, IMPORT_ROLE } from '../../src/lib/server/import/run';
import { liveToken } from '../../src/lib/server/queries/memberships';
import { makeShop, pgError, testDb } from '../helpers/db';
import { uniqueEmail } from '../helpers/people';

const { db, sql } = testDb();
let a: Awaited<ReturnType<typeof makeShop>>;
let b: Awaited<ReturnType<typeof makeShop>>;
let headA: string;
let headB: string;

beforeAll(async () => {
	a = await makeShop(db, 'rls-a');
	b = await makeShop(db, 'rls-b');
	for (const s of [a, b]) {
		await withShop(db, s.shop.id, async (tx) => {
			const [h] = await tx.insert(heads).values({ shopId: s.shop.id, familyId: s.family.id, serial: 'RLS-1', receivedOn: '2026-05-01' }).returning();
			await tx.insert(readings).values({ shopId: s.shop.id, headId: h.id, familyId: s.family.id, stage: 'as_received', cylinder: 1, side: 'intake', valve: 1, measurement: 'clearance', value: 0.05, measuredAt: new Date('2026-05-02T08:00:00Z'), measuredBy: 'RLS' });
			if (s === a) headA = h.id;
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

	it('the position tallies (derived by triggers) show only the active shop, and refuse another shop’s row', async () => {
		// A limit version in each shop: the limits trigger judges that shop's reading into its tallies.
		for (const s of [a, b]) {
			await withShop(db, s.shop.id, (tx) =>
				tx.insert(limits).values({ shopId: s.shop.id, familyId: s.family.id, measurement: 'clearance', stage: 'as_received', side: 'intake', min: null, max: 0.08, effectiveFrom: '2026-01-01' })
			);
		}
		const seen = await withShop(db, a.shop.id, (tx) => tx.execute<{ shop_id: string; checked: number }>(raw`select shop_id, checked from reading_position_tallies`));
		expect(seen).toEqual([{ shop_id: a.shop.id, checked: 1 }]);
		const [both] = await withSystem(db, (tx) => tx.execute<{ n: number }>(raw`select count(distinct shop_id)::int as n from reading_position_tallies where shop_id in (${a.shop.id}, ${b.shop.id})`));
		expect(both.n).toBe(2);
		const err = await pgError(() =>
			withShop(db, a.shop.id, (tx) =>
				tx.execute(raw`insert into reading_position_tallies (shop_id, series_key, family_id, month, cylinder, prev_month, checked, failed)
					values (${b.shop.id}, 8, ${b.family.id}, '2026-05-01', 1, '-infinity', 1, 0)`)
			)
		);
		expect(err.code).toBe('42501');
	});

	it('the token lookup looks across shops for itself only', async () => {
		const token = newApiToken();
		await withSystem(db, async (tx) => {
			const [u] = await tx.insert(users).values({ email: uniqueEmail('rls-token') }).returning();
			await tx.insert(memberships).values({ shopId: b.shop.id, userId: u.id, role: 'viewer' });
			await tx.insert(apiTokens).values({ shopId: b.shop.id, userId: u.id, name: 'rls', prefix: token.slice(0, 10), tokenHash: sha256Hex(token), role: 'viewer' });
		});
		// Inside shop A's transaction: it finds shop B's token, then A's scope is back as it was.
		const seen = await withShop(db, a.shop.id, async (tx) => {
			const row = await liveToken(tx, sha256Hex(token));
			const [after] = await tx.execute<{ system: string | null; tokens: number; heads: number }>(raw`
				select current_setting('lapmark.system', true) as system,
					(select count(*)::int from api_tokens where shop_id = ${b.shop.id}) as tokens,
					(select count(*)::int from heads where id = ${headB}) as heads`);
			return { row, after };
		});
		expect(seen.row).toMatchObject({ shopId: b.shop.id, tokenRole: 'viewer', memberRole: 'viewer' });
		expect(seen.after).toEqual({ system: '', tokens: 0, heads: 0 });
		// On its own (no transaction): the next statement sees nothing either.
		expect(await liveToken(db, sha256Hex(token))).toMatchObject({ shopId: b.shop.id });
		const [none] = await db.execute<{ n: number }>(raw`select count(*)::int as n from api_tokens`);
		expect(none.n).toBe(0);
	});
});

// The bulk import COPYs new readings straight into readings as lapmark_import, a role that
// bypasses row-level security (PostgreSQL refuses COPY FROM into a table under it). What keeps
// those rows in the importing shop is checked here: the role may do nothing but insert readings,
// a row naming another shop fails the (shop_id, batch_id) foreign key or the summary trigger's
// row-level security, and the shop id is the import's own (never the file's).
const [{ there: importRole }] = await sql`select exists (select 1 from pg_roles where rolname = ${IMPORT_ROLE}) as there`;

describe.skipIf(!importRole)('the import role', () => {
	/** COPYs one reading as the import role in a transaction scoped to shop A; returns the error. */
	async function copyAsImport(row: { shop: string; head: string; family: string; batch: string | null }) {
		return pgError(() =>
			sql.begin(async (t) => {
				await t`select set_config('lapmark.shop_id', ${a.shop.id}, true)`;
				const channel = new CopyChannel(t);
				await channel.write('readings', `${row.shop}\t${row.head}\t${row.family}\tfinal\t1\tintake\t1\tclearance\t0.04\t2026-05-03T08:00:00Z\tRLS\t\\N\t${row.batch ?? '\\N'}\n`);
				await channel.end();
			})
		);
	}

	it('may insert readings only: it reads, changes and deletes nothing', async () => {
		for (const statement of ['select count(*) from readings', 'select count(*) from heads', `update readings set value = 0 where head_id = '${headB}'`, 'delete from readings']) {
			const err = await pgError(() =>
				sql.begin(async (t) => {
					await t.unsafe(`set local role ${IMPORT_ROLE}`);
					await t.unsafe(statement);
				})
			);
			expect(err.code, statement).toBe('42501');
		}
	});

	it('writes a row of the transaction’s shop, and refuses one of another shop', async () => {
		const [batchA] = await withShop(db, a.shop.id, (tx) =>
			tx.insert(importBatches).values({ shopId: a.shop.id, fileName: 'rls.csv', contentHash: 'rls', layout: 'wide', onReject: 'abort', status: 'running' }).returning()
		);
		// The control: shop A's own head and batch go in.
		await sql.begin(async (t) => {
			await t`select set_config('lapmark.shop_id', ${a.shop.id}, true)`;
			const channel = new CopyChannel(t);
			await channel.write('readings', `${a.shop.id}\t${headA}\t${a.family.id}\tfinal\t1\tintake\t1\tclearance\t0.04\t2026-05-03T08:00:00Z\tRLS\t\\N\t${batchA.id}\n`);
			await channel.end();
		});
		// Shop B's head under A's batch: the batch belongs to A, so (shop_id, batch_id) has no match.
		const viaBatch = await copyAsImport({ shop: b.shop.id, head: headB, family: b.family.id, batch: batchA.id });
		expect(viaBatch.code).toBe('23503');
		expect(viaBatch.constraint).toBe('readings_batch_fk');
		// Shop A's id on shop B's head: no such (shop, head, family).
		const viaHead = await copyAsImport({ shop: a.shop.id, head: headB, family: b.family.id, batch: batchA.id });
		expect(viaHead.code).toBe('23503');
		// Shop B's row without a batch: the summary trigger writes under shop A's row-level security.
		const viaSummary = await copyAsImport({ shop: b.shop.id, head: headB, family: b.family.id, batch: null });
		expect(viaSummary.code).toBe('42501');
		expect(viaSummary.message).toMatch(/row-level security/);
		const inB = await withShop(db, b.shop.id, (tx) => tx.execute<{ n: number }>(raw`select count(*)::int as n from readings`));
		expect(inB[0].n).toBe(1);
		const inA = await withShop(db, a.shop.id, (tx) => tx.execute<{ n: number }>(raw`select count(*)::int as n from readings where stage = 'final'`));
		expect(inA[0].n).toBe(1);
	});
});
