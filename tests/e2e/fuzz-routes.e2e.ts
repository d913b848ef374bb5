// One property over every route and operation of the access policy (POLICY): arbitrary strings
// and numbers (NUL and other control characters, huge and tiny numbers, long strings, odd
// dates) in the query string, in form fields and in JSON bodies, sent as an owner with a
// session (pages, actions) and with a token (/api/v1), never get a 5xx. The owner is of a shop
// of the test's own, so whatever the actions change touches no other test's data.
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import '../setup/fast-check';
import { POLICY } from '../../src/lib/server/auth/access';
import { newApiToken, sha256Hex } from '../../src/lib/server/auth/tokens';
import { withSystem } from '../../src/lib/server/db/scope';
import { apiTokens } from '../../src/lib/server/db/schema';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { shopWithPeople } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();

/** Operations that would end the test's own session: tried once by hand, not fuzzed. */
const SKIP = new Set(['/(auth)/signout action:default']);

/** Field and parameter names the app reads: the keys of the zod schemas and every form.get(). */
function knownNames(): string[] {
	const names = new Set<string>(['redirectTo', 'callbackUrl', 'error', 'x']);
	for (const f of readdirSync('src/lib/schemas')) {
		if (!f.endsWith('.ts') || f.endsWith('.spec.ts')) continue;
		for (const m of readFileSync(join('src/lib/schemas', f), 'utf8').matchAll(/^\t{1,3}(\w+): /gm)) names.add(m[1]);
	}
	const walk = (dir: string) => {
		for (const e of readdirSync(dir, { withFileTypes: true })) {
			const p = join(dir, e.name);
			if (e.isDirectory()) walk(p);
			else if (e.name.endsWith('.ts')) for (const m of readFileSync(p, 'utf8').matchAll(/form\.get(?:All)?\('(\w+)'\)/g)) names.add(m[1]);
		}
	};
	walk('src/routes');
	return [...names].sort();
}

const NAMES = knownNames();

const oddText = fc.constantFrom(
	'',
	' ',
	'\u0000',
	'a\u0000b',
	'\u0001\u001f\u007f\u0085',
	'\n',
	'\r\n',
	'\t',
	'/%09/evil.example',
	'/\t/evil.example',
	'//evil.example',
	'/\\evil.example',
	'%0A',
	'\ud800',
	'😀',
	'ALDER-4',
	'TEST-4',
	'clearance',
	'intake',
	'exhaust',
	'as_received',
	'final',
	'decision:replace_valve',
	'owner',
	'mm',
	'on',
	'-measuredAt',
	'{"a":"b"}',
	'{"a":"\\u0000"}',
	'[1e308,-1e308,1e308]'
);
const oddDate = fc.constantFrom('9999-12-31', '0000-01-01', '0001-01-01', '1899-12-31', '2026-02-30', '2026-13-01', '2024-02-29', '+020000-01-01', '2999-12-31', '1970-01-01', '2026-1-1');
const oddNumber = fc.oneof(
	fc.constantFrom('1e308', '-1e308', '1e-320', '5e-324', '-0', 'NaN', 'Infinity', '-Infinity', '0x10', '1_000', '9'.repeat(400), '0.'.padEnd(400, '1'), '1,5', '-1', '0', '2147483648', '9007199254740993'),
	fc.double().map(String),
	fc.integer().map(String),
	fc.bigInt({ min: -(10n ** 30n), max: 10n ** 30n }).map(String)
);
const anyValue = fc.oneof(
	{ weight: 3, arbitrary: oddText },
	{ weight: 2, arbitrary: oddDate },
	{ weight: 3, arbitrary: oddNumber },
	{ weight: 3, arbitrary: fc.string({ unit: 'binary', maxLength: 40 }) },
	{ weight: 1, arbitrary: fc.string({ minLength: 500, maxLength: 5000 }) }
);
const name = fc.oneof({ weight: 6, arbitrary: fc.constantFrom(...NAMES) }, { weight: 1, arbitrary: fc.string({ unit: 'binary', minLength: 1, maxLength: 12 }) });
const params = fc.array(fc.tuple(name, anyValue), { maxLength: 6 });

/** JSON bodies: arbitrary JSON, arrays of numbers at the edges of doubles, and known keys. */
const jsonBody = fc.oneof(
	fc.jsonValue({ maxDepth: 3 }),
	fc.array(fc.oneof(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.constantFrom(1e308, -1e308, 5e-324, -0, 1.7976931348623157e308)), { maxLength: 50 }),
	fc.record({ headers: fc.array(fc.oneof(oddText, fc.string({ unit: 'binary', maxLength: 30 })), { maxLength: 5 }), layout: fc.oneof(oddText, fc.constantFrom('wide', 'long')) }, { requiredKeys: [] }),
	fc.dictionary(fc.constantFrom(...NAMES), fc.oneof(anyValue, fc.double(), fc.integer()), { maxKeys: 5 })
);
const csvBody = fc.oneof(
	fc.string({ unit: 'binary', maxLength: 300 }),
	fc.tuple(fc.array(fc.oneof(fc.constantFrom('head_serial', 'family', 'stage', 'cylinder', 'side', 'valve', 'measured_at', 'clearance_mm', 'x\u0000y', ''), oddText), { minLength: 1, maxLength: 8 }), fc.array(fc.array(anyValue, { maxLength: 8 }), { maxLength: 5 })).map(
		([h, rows]) => [h.join(','), ...rows.map((r) => r.map((v) => v.replace(/[\r\n,"]/g, ' ')).join(','))].join('\n')
	)
);

interface Op {
	route: string;
	op: string;
}
const OPS: Op[] = Object.entries(POLICY)
	.flatMap(([route, ops]) => Object.keys(ops).map((op) => ({ route, op })))
	.filter((o) => !SKIP.has(`${o.route} ${o.op}`));

let owner: Client;
let token: string;
const ids: Record<string, string[]> = {};

beforeAll(async () => {
	const { shop, family, people } = await shopWithPeople(db, 'fuzz');
	owner = new Client(baseURL);
	await owner.signIn(people.owner.email, people.owner.password);
	expect(owner.signedIn).toBe(true);
	token = newApiToken();
	await withSystem(db, (tx) =>
		tx.insert(apiTokens).values({ shopId: shop.id, userId: people.owner.userId, name: 'fuzz', prefix: token.slice(0, 10), tokenHash: sha256Hex(token), role: 'owner' })
	);
	// A head of the shop, so that the head routes get past their id.
	const intake = await owner.request('POST', '/heads/new', {
		form: { serial: 'FUZZ-1', familyId: family.id, customer: 'Fuzz fleet', customerEmail: '', receivedOn: '2026-11-02', usageUnit: 'km', usage: '120000', complaint: '', leakMode: 'pct', pressureUnit: 'kPa' }
	});
	const headId = /\/heads\/([0-9a-f-]{36})/.exec(intake.headers.get('location') ?? '')?.[1];
	ids.id = [family.id, ...(headId ? [headId] : []), '00000000-0000-0000-0000-000000000000'];
	ids.code = ['TEST-4'];
	ids.stage = ['as_received', 'final'];
	ids.token = ['x'.repeat(43)];
});
afterAll(() => sql.end());

/** A path for a route id: groups dropped, each [param] a known value or an arbitrary one. */
function pathOf(route: string, pick: (param: string) => string): string {
	const path = route
		.split('/')
		.filter((s) => !/^\(.*\)$/.test(s))
		.map((s) => {
			const m = /^\[(\w+)\]$/.exec(s);
			return m ? enc(pick(m[1])) : s;
		})
		.join('/');
	return path === '' ? '/' : path;
}

/** As a browser sends text: a lone surrogate cannot be written in UTF-8 and becomes U+FFFD. */
const wellFormed = (s: string) => Buffer.from(s, 'utf8').toString('utf8');
const enc = (s: string) => encodeURIComponent(wellFormed(s));

function query(pairs: [string, string][]): string {
	return pairs.map(([k, v]) => `${enc(k)}=${enc(v)}`).join('&');
}

describe('every route and operation, with arbitrary parameters and bodies', () => {
	it('never answers 5xx', async () => {
		const failures: string[] = [];
		const seen = new Set<string>();
		const statuses = new Map<number, number>();
		await fc.assert(
			fc.asyncProperty(
				fc.constantFrom(...OPS),
				fc.array(fc.oneof(fc.constantFrom('known', 'known', 'known'), anyValue), { minLength: 2, maxLength: 2 }),
				params,
				params,
				jsonBody,
				csvBody,
				fc.boolean(),
				async ({ route, op }, paramPicks, qs, fields, json, csv, enhanced) => {
					let n = 0;
					const path = pathOf(route, (param) => {
						const pick = paramPicks[n++ % paramPicks.length];
						const known = ids[param] ?? ['x'];
						return pick === 'known' ? known[n % known.length] : pick;
					});
					const api = route.startsWith('/api/');
					const headers: Record<string, string> = api ? { authorization: `Bearer ${token}` } : {};
					let res: Response;
					let what: string;
					if (op.startsWith('action:')) {
						const action = op.slice('action:'.length);
						const url = `${path}?${action === 'default' ? '' : `/${action}`}${qs.length ? (action === 'default' ? '' : '&') + query(qs) : ''}`;
						const form: Record<string, string> = Object.fromEntries(fields);
						if (enhanced) {
							headers.accept = 'application/json';
							headers['x-sveltekit-action'] = 'true';
						}
						what = `POST ${url} form=${JSON.stringify(form)}`;
						res = await owner.request('POST', url, { form, headers });
					} else {
						const url = `${path}${qs.length ? `?${query(qs)}` : ''}`;
						if (op === 'GET') {
							what = `GET ${url}`;
							res = await owner.request('GET', url, { headers });
						} else if (route === '/api/v1/imports' && op === 'POST') {
							const body = csv;
							what = `POST ${url} csv=${JSON.stringify(body)}`;
							res = await owner.request('POST', `${path}?dryRun=1&${query(qs)}`, { headers: { ...headers, 'content-type': 'text/csv' }, body });
						} else {
							what = `${op} ${url} json=${JSON.stringify(json)}`;
							res = await owner.request(op, url, { json, headers });
						}
					}
					const text = await res.text();
					seen.add(`${route} ${op}`);
					statuses.set(res.status, (statuses.get(res.status) ?? 0) + 1);
					if (res.status >= 500) failures.push(`${res.status} ${what} → ${text.slice(0, 200)}`);
					return res.status < 500;
				}
			),
			{ numRuns: Number(process.env.FUZZ_RUNS ?? 900), endOnFailure: true }
		);
		if (process.env.FUZZ_DEBUG) console.log('statuses', [...statuses].sort(), 'ids', ids);
		expect(failures).toEqual([]);
		// Most operations were tried at least once in this run.
		expect(seen.size).toBeGreaterThan(OPS.length * 0.9);
		// The session survived: the owner is still signed in.
		expect((await owner.get('/api/v1/me')).status).toBe(200);
	}, 300_000);
});
