// `npm run shop:create` as an operator runs it: a command against the test database that
// creates the shop and its owner, prints and mails a one-time link to choose the password,
// gives an existing account the new shop, and refuses bad input without changing anything.
import { spawnSync } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { fileURLToPath } from 'node:url';
import type postgres from 'postgres';
import { afterAll, describe, expect, it } from 'vitest';
import { resetIsValid } from '../../src/lib/server/services/password-reset';
import { testDb } from '../helpers/db';
import { firstLink, waitForMail } from '../helpers/mail';

const root = fileURLToPath(new URL('../..', import.meta.url));
const { db, sql } = testDb();
afterAll(() => sql.end());

function shopCreate(...args: string[]) {
	const r = spawnSync('npx', ['tsx', 'scripts/shop-create.ts', ...args], {
		cwd: root,
		env: { ...process.env, ORIGIN: 'https://lapmark.test.example' },
		encoding: 'utf8',
		timeout: 60_000
	});
	return { code: r.status, out: r.stdout, err: r.stderr };
}

async function system<T>(query: (t: postgres.TransactionSql) => Promise<T>): Promise<T> {
	return sql.begin(async (t) => {
		await t`select set_config('lapmark.system', 'on', true)`;
		return query(t);
	}) as Promise<T>;
}

const tag = randomUUID().slice(0, 8);
const owner = `operator-made-${tag}@test.example`;
const name = `Quayside Cylinder Heads ${tag}`;
const refused = `Refused ${tag}`;
const refusedOwner = `refused-${tag}@test.example`;

describe('npm run shop:create', () => {
	it('creates the shop with its units and currency, and its owner with a one-time password link', async () => {
		const started = Date.now() - 1000;
		const r = shopCreate('--name', name, '--owner', owner, '--owner-name', 'Sam Operator', '--units', 'inch', '--mileage', 'miles', '--currency', 'usd');
		expect(r.err).not.toMatch(/could not be sent/);
		expect(r.code).toBe(0);
		expect(r.out).toContain(`created the shop "${name}" (quayside-cylinder-heads-${tag}`);
		const printed = /link to choose the password \(works once, for 72 hours\): (\S+)/.exec(r.out)?.[1];
		expect(printed).toMatch(/^https:\/\/lapmark\.test\.example\/signin\/reset\/[A-Za-z0-9_-]{30,}$/);

		const rows = await system(
			(t) => t<{ shop: string; length_unit: string; distance_unit: string; currency: string; role: string; user_name: string; has_password: boolean; verified: boolean }[]>`
				select s.name as shop, s.length_unit, s.distance_unit, s.currency, m.role, u.name as user_name,
					u.password_hash is not null as has_password, u.email_verified is not null as verified
				from shops s join memberships m on m.shop_id = s.id join "user" u on u.id = m.user_id
				where u.email = ${owner}`
		);
		expect(rows).toEqual([{ shop: name, length_unit: 'in', distance_unit: 'mi', currency: 'USD', role: 'owner', user_name: 'Sam Operator', has_password: false, verified: false }]);
		const [audit] = await system((t) => t<{ n: number }[]>`select count(*)::int as n from audit_log a join shops s on s.id = a.shop_id where s.name = ${name} and a.entity in ('shop', 'membership')`);
		expect(audit.n).toBe(2);

		const secret = printed!.split('/').pop()!;
		expect(await resetIsValid(db, secret)).toBe(true);
		const mail = await waitForMail(owner, /is ready/, started);
		expect(mail.subject).toBe(`Your Lapmark shop ${name} is ready`);
		expect(firstLink(mail)).toBe(printed);
	});

	it('makes an existing account the owner of a second shop, without a new account or link', async () => {
		const second = `Second Bench ${tag}`;
		const r = shopCreate('--name', second, '--owner', owner.toUpperCase());
		expect(r.code).toBe(0);
		expect(r.out).toContain('(an existing account)');
		expect(r.out).not.toContain('/signin/reset/');
		const [users] = await system((t) => t<{ n: number }[]>`select count(*)::int as n from "user" where email = ${owner}`);
		expect(users.n).toBe(1);
		const shops = await system((t) => t<{ name: string; length_unit: string; currency: string }[]>`
			select s.name, s.length_unit, s.currency from shops s join memberships m on m.shop_id = s.id join "user" u on u.id = m.user_id
			where u.email = ${owner} and m.role = 'owner' order by s.created_at`);
		expect(shops).toEqual([
			{ name, length_unit: 'in', currency: 'USD' },
			{ name: second, length_unit: 'mm', currency: 'EUR' }
		]);
	});

	it.each([
		[['--owner', refusedOwner], '--name is required'],
		[['--name', refused], '--owner is required'],
		[['--name', refused, '--owner', 'not an address'], '--owner: That does not look like an e-mail address.'],
		[['--name', refused, '--owner', refusedOwner, '--units', 'furlong'], '--units: "furlong" is not a length unit; use mm or inch.'],
		[['--name', refused, '--owner', refusedOwner, '--currency', 'DOGE'], '--currency: Choose one of EUR, USD'],
		[['--name', '   ', '--owner', refusedOwner], "--name: Type the shop's name."],
		[['--name', refused, '--owner', refusedOwner, '--colour', 'red'], "Unknown option '--colour'"]
	])('refuses %j with a message naming the parameter, changing nothing', async (args, message) => {
		const r = shopCreate(...args);
		expect(r.code).toBe(2);
		expect(r.err).toContain(message);
		const [left] = await system((t) => t<{ shops: number; users: number }[]>`
			select (select count(*)::int from shops where name = ${refused}) as shops, (select count(*)::int from "user" where email = ${refusedOwner}) as users`);
		expect(left).toEqual({ shops: 0, users: 0 });
	});
});
