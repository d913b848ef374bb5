// Seeding against the real PostgreSQL: a small demo under shop slugs of its own (so it runs
// beside other test files and the demo the test set-up seeds), counted back row by row.
import { createHash, randomUUID } from 'node:crypto';
import bcrypt from 'bcryptjs';
import postgres from 'postgres';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShopSql, withSystemSql } from '../db/scope';
import { generateDemo, type DemoData } from './generate';
import { isDatabaseEmpty, seedDemo } from './seed';

const url = process.env.DATABASE_URL;
if (!url) console.warn('seed.db.spec: DATABASE_URL is not set, skipping (run through `npm test`)');

describe.skipIf(!url)('seedDemo', () => {
	const sql = postgres(url ?? '', { max: 2, onnotice: () => {} });
	const opts = { seed: 4242, endDate: '2026-06-30', headsTotal: 60, slugSuffix: `t${randomUUID().slice(0, 8)}` };
	let data: DemoData;

	/** Runs a query looking across shops, as sign-in and set-up code does. */
	const system = <T>(work: (tx: postgres.TransactionSql) => Promise<T>) => withSystemSql(sql, work);

	async function countRows() {
		const shopIds = data.shops.map((s) => s.id);
		const emails = data.users.map((u) => u.email);
		return system(async (tx) => {
			const count = async (table: string) => {
				const [r] = await tx<{ n: number }[]>`select count(*)::int as n from ${tx(table)} where shop_id in ${tx(shopIds)}`;
				return r.n;
			};
			const [shops] = await tx<{ n: number }[]>`select count(*)::int as n from shops where id in ${tx(shopIds)}`;
			const [users] = await tx<{ n: number }[]>`select count(*)::int as n from "user" where email in ${tx(emails)}`;
			return {
				shops: shops.n,
				users: users.n,
				memberships: await count('memberships'),
				families: await count('families'),
				limits: await count('limits'),
				instruments: await count('instruments'),
				apiTokens: await count('api_tokens'),
				heads: await count('heads'),
				readings: await count('readings'),
				decisions: await count('decisions'),
				cylinderLeakage: await count('cylinder_leakage')
			};
		});
	}

	beforeAll(async () => {
		data = generateDemo(opts);
		await seedDemo(sql, { ...opts, data });
	});

	afterAll(async () => {
		if (data) {
			await system(async (tx) => {
				await tx`delete from shops where id in ${tx(data.shops.map((s) => s.id))}`;
				await tx`delete from "user" where email in ${tx(data.users.map((u) => u.email))}`;
			});
		}
		await sql.end();
	});

	it('writes exactly the rows the generator counted', async () => {
		expect(data.counts.readings).toBeGreaterThan(5000);
		expect(await countRows()).toEqual(data.counts);
	});

	it('stores the demo users with working password hashes and hashed API tokens', async () => {
		const owner = data.signIns.find((s) => s.role === 'owner')!;
		const rows = await system(
			(tx) => tx<{ email: string; password_hash: string; role: string; slug: string }[]>`
				select u.email, u.password_hash, m.role, s.slug
				from "user" u join memberships m on m.user_id = u.id join shops s on s.id = m.shop_id
				where u.email in ${tx(data.signIns.map((s) => s.email))}`
		);
		expect(rows.map((r) => `${r.email} ${r.role} ${r.slug}`).sort()).toEqual(data.signIns.map((s) => `${s.email} ${s.role} ${s.shop}`).sort());
		const hash = rows.find((r) => r.email === owner.email)!.password_hash;
		expect(await bcrypt.compare(owner.password, hash)).toBe(true);
		const tokenHash = createHash('sha256').update(owner.token).digest('hex');
		const tokens = await system((tx) => tx<{ role: string }[]>`select role from api_tokens where token_hash = ${tokenHash}`);
		expect(tokens).toEqual([{ role: 'owner' }]);
	});

	it('writes each shop under its own scope, so row-level security shows one shop at a time', async () => {
		const [a, b] = data.shops;
		const seen = await withShopSql(sql, a.id, (tx) => tx<{ shop_id: string }[]>`select distinct shop_id from readings where shop_id in ${tx([a.id, b.id])}`);
		expect(seen).toEqual([{ shop_id: a.id }]);
	});

	it('no longer reports the database as empty', async () => {
		expect(await isDatabaseEmpty(sql)).toBe(false);
	});

	it('refuses a second seed into the same shops with a unique violation, leaving nothing behind', async () => {
		const before = await countRows();
		let error: { code?: string } | null = null;
		try {
			await seedDemo(sql, { ...opts, data });
		} catch (e) {
			error = e as { code?: string };
		}
		expect(error?.code).toBe('23505');
		expect(await countRows()).toEqual(before);
	});
});
