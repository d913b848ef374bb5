// Every route × operation × role against the running app: allowed, sent to sign-in (pages) or
// 401 (API) when signed out, 403 for a role too low. The table below is written by hand,
// independently of the policy in src/lib/server/auth/access.ts, and must list every route:
// adding a route without a line here fails this test.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { ROLES, type Role } from '../../src/lib/measurements';
import { listRoutes } from '../../src/lib/server/auth/routes';
import { ROLE_RANK } from '../../src/lib/roles';
import { testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { shopWithPeople } from '../helpers/people';

type Expect = 'public' | 'user' | Role;

const EXPECTED: Record<string, Record<string, Expect>> = {
	'/(app)': { GET: 'viewer' },
	'/(app)/switch-shop': { GET: 'user', 'action:default': 'user' },
	'/(app)/audit': { GET: 'engineer' },
	'/(app)/dev/mail': { GET: 'owner' },
	'/(app)/dev/mail/[id]': { GET: 'owner' },
	'/(app)/heads': { GET: 'viewer' },
	'/(app)/heads/new': { GET: 'machinist', 'action:default': 'machinist' },
	'/(app)/heads/[id]': { GET: 'viewer', 'action:release': 'machinist', 'action:emailReport': 'machinist', 'action:comeback': 'machinist' },
	'/(app)/heads/[id]/entry/[stage]': { GET: 'viewer', 'action:save': 'machinist' },
	'/(app)/heads/[id]/decisions': { GET: 'viewer', 'action:decide': 'machinist', 'action:acceptAll': 'machinist' },
	'/(app)/heads/[id]/report': { GET: 'viewer' },
	'/(app)/families': { GET: 'machinist', 'action:create': 'engineer', 'action:sealPass': 'engineer' },
	'/(app)/families/[id]': { GET: 'machinist', 'action:update': 'engineer', 'action:limit': 'engineer' },
	'/(app)/instruments': { GET: 'machinist', 'action:create': 'engineer', 'action:calibrate': 'engineer', 'action:retire': 'engineer' },
	'/(app)/settings/members': { GET: 'owner', 'action:invite': 'owner', 'action:role': 'owner', 'action:remove': 'owner', 'action:revokeInvite': 'owner' },
	'/(app)/settings/password': { GET: 'user', 'action:default': 'user' },
	'/(app)/settings/tokens': { GET: 'engineer', 'action:create': 'engineer', 'action:revoke': 'engineer' },
	'/(auth)/invite/[token]': { GET: 'public', 'action:accept': 'public' },
	'/(auth)/signin': { GET: 'public', 'action:password': 'public', 'action:link': 'public' },
	'/(auth)/signin/check-email': { GET: 'public' },
	'/(auth)/signin/forgot': { GET: 'public', 'action:default': 'public' },
	'/(auth)/signin/reset/[token]': { GET: 'public', 'action:default': 'public' },
	'/(auth)/signout': { GET: 'public', 'action:default': 'user' },
	'/api/health': { GET: 'public' },
	'/api/v1/me': { GET: 'viewer' },
	'/api/v1/overview': { GET: 'viewer' },
	'/api/v1/families': { GET: 'viewer' },
	'/api/v1/imports': { GET: 'machinist', POST: 'machinist' },
	'/api/v1/imports/[id]': { GET: 'machinist', DELETE: 'engineer' },
	'/api/v1/imports/[id]/rejects.csv': { GET: 'machinist' },
	'/api/v1/imports/headers': { POST: 'machinist' },
	'/(app)/imports': { GET: 'machinist', 'action:undo': 'engineer' },
	'/(app)/check': { GET: 'machinist' },
	'/(app)/fleet': { GET: 'machinist' },
	'/(app)/fleet/[code]': { GET: 'machinist' },
	'/(app)/quality': { GET: 'machinist', 'action:baseline': 'engineer' },
	'/api/v1/check': { GET: 'viewer' },
	'/api/v1/stats/capability': { GET: 'viewer' },
	'/api/v1/stats/capability/machinists': { GET: 'viewer' },
	'/api/v1/stats/comebacks': { GET: 'viewer' },
	'/api/v1/stats/first-pass': { GET: 'viewer' },
	'/api/v1/stats/compare': { GET: 'viewer' },
	'/api/v1/stats/control': { GET: 'viewer' },
	'/api/v1/stats/pchart': { GET: 'viewer' },
	'/api/v1/stats/distribution': { GET: 'viewer' },
	'/api/v1/stats/outliers': { GET: 'viewer' },
	'/api/v1/stats/rates': { GET: 'viewer' },
	'/api/v1/stats/wear': { GET: 'viewer' },
	'/api/v1/stats/describe': { POST: 'viewer' },
	'/(app)/outliers': { GET: 'machinist' },
	'/(app)/rates': { GET: 'machinist' },
	'/api/v1/readings': { GET: 'engineer' },
	'/(app)/explore': { GET: 'engineer' },
	'/api/v1/openapi.json': { GET: 'public' },
	'/(app)/api-guide': { GET: 'engineer' },
	'/(auth)/signup': { GET: 'public', 'action:default': 'public' },
	'/(auth)/signup/confirm/[token]': { GET: 'public', 'action:confirm': 'public' },
	'/(app)/settings/shop': { GET: 'owner' },
	'/(app)/settings/shop/archive.zip': { GET: 'owner' }
};

/** A concrete URL for a route id: groups dropped, parameters filled with harmless values. */
function urlFor(id: string): string {
	const path = id
		.split('/')
		.filter((seg) => !/^\(.+\)$/.test(seg))
		.map((seg) => (seg.startsWith('[') ? 'no-such-thing' : seg))
		.join('/');
	return path === '' ? '/' : path;
}

const routes = listRoutes(new URL('../../src/routes', import.meta.url).pathname);
const baseURL = inject('baseURL');
const { db, sql } = testDb();
const clients = {} as Record<Role, Client>;
let people: Awaited<ReturnType<typeof shopWithPeople>>['people'];

beforeAll(async () => {
	({ people } = await shopWithPeople(db, 'access'));
	for (const role of ROLES) {
		const c = new Client(baseURL);
		const res = await c.signIn(people[role].email, people[role].password);
		expect([302, 303], `sign-in as ${role}`).toContain(res.status);
		expect(c.signedIn, `session cookie for ${role}`).toBe(true);
		clients[role] = c;
	}
});
afterAll(() => sql.end());

async function send(signedIn: Client, id: string, op: string) {
	// A copy of the cookies; sign-out ends the session on the server, so it gets a session of
	// its own and leaves the shared one signed in.
	const client = new Client(baseURL);
	client.cookies = new Map(signedIn.cookies);
	const role = (Object.keys(clients) as Role[]).find((r) => clients[r] === signedIn);
	if (id === '/(auth)/signout' && role) {
		client.cookies = new Map();
		await client.signIn(people[role].email, people[role].password);
	}
	const url = urlFor(id);
	if (op.startsWith('action:')) {
		const name = op.slice('action:'.length);
		return client.request('POST', name === 'default' ? url : `${url}?/${name}`, { form: {} });
	}
	return client.request(op, url, { headers: { accept: url.startsWith('/api/') ? 'application/json' : 'text/html' } });
}

describe('the access table', () => {
	it('lists every route and every operation of the app', () => {
		for (const r of routes) {
			expect(EXPECTED[r.id], `add ${r.id} to EXPECTED in this test`).toBeDefined();
			for (const op of r.operations) expect(EXPECTED[r.id][op], `add ${r.id} ${op} to EXPECTED`).toBeDefined();
		}
		const ids = new Set(routes.map((r) => r.id));
		for (const id of Object.keys(EXPECTED)) expect(ids.has(id), `${id} is no longer a route`).toBe(true);
	});
});

const cases = Object.entries(EXPECTED).flatMap(([id, ops]) => Object.entries(ops).map(([op, least]) => ({ id, op, least })));

describe.each(cases)('$id $op (least: $least)', ({ id, op, least }) => {
	const isApi = id.startsWith('/api/');

	it('signed out', async () => {
		const res = await send(new Client(baseURL), id, op);
		if (least === 'public') {
			expect(res.status).toBeLessThan(500);
			expect([401, 403]).not.toContain(res.status);
		} else if (isApi) {
			expect(res.status).toBe(401);
		} else {
			expect(res.status).toBe(303);
			expect(res.headers.get('location')).toMatch(/^\/signin\?redirectTo=/);
		}
	});

	it.each(ROLES)('as %s', async (role) => {
		const res = await send(clients[role], id, op);
		const allowed = least === 'public' || least === 'user' || ROLE_RANK[role] >= ROLE_RANK[least as Role];
		if (allowed) {
			expect(res.status, `${role} should be allowed`).toBeLessThan(500);
			expect([401, 403]).not.toContain(res.status);
			expect(res.headers.get('location') ?? '').not.toMatch(/^\/signin\?redirectTo/);
		} else {
			expect(res.status, `${role} should be refused`).toBe(403);
		}
	});
});
