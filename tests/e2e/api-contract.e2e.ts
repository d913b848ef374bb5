// The API's answers against its own OpenAPI document: every /api/v1 operation of the access
// policy is requested over HTTP against the built app with realistic parameters (and, for each
// family of routes, with a bad parameter and an unknown name or id), and each real body is
// validated with ajv against the schema the served /api/v1/openapi.json gives for that status and
// content type. The document's objects are strict (no field left out, none extra), so an answer
// that gains or loses a field fails here until $lib/contract says so.
import { randomUUID } from 'node:crypto';
import { Ajv2020, type ValidateFunction } from 'ajv/dist/2020.js';
import addFormats from 'ajv-formats';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { POLICY } from '../../src/lib/server/auth/access';
import { newApiToken, sha256Hex } from '../../src/lib/server/auth/tokens';
import { withShop, withSystem } from '../../src/lib/server/db/scope';
import { apiTokens, comebacks, heads, instruments, limits, readings } from '../../src/lib/server/db/schema';
import { openApiPath } from '../../src/lib/server/openapi';
import { raw, testDb } from '../helpers/db';
import { shopWithPeople } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
let token = '';
/** Import batches made by the cases, by name. */
const batch: Record<string, string> = {};

const HEADER = 'head_serial,family,stage,cylinder,side,valve,measured_at,measured_by,clearance_mm';
const csvOf = (serial: string, rows: string[]) => [HEADER, ...rows.map((r) => `${serial},${r}`)].join('\n') + '\n';
/** Four good rows and one whose cylinder the family does not have. */
const WITH_BAD_ROW = (serial: string) =>
	csvOf(serial, ['TEST-4,as_received,1,intake,1,2026-02-03T08:00:00Z,Kim,0.051', 'TEST-4,as_received,2,intake,1,2026-02-03T08:01:00Z,Kim,0.047', 'TEST-4,as_received,3,exhaust,2,2026-02-03T08:02:00Z,Kim,0.062', 'TEST-4,as_received,9,intake,1,2026-02-03T08:03:00Z,Kim,0.05', 'TEST-4,as_received,4,exhaust,1,2026-02-03T08:04:00Z,Kim,0.058']);

interface Case {
	/** The policy's route id and method. */
	route: string;
	method: 'GET' | 'POST' | 'DELETE';
	path: () => string;
	body?: () => { type: string; data: string };
	status: number;
	/** Run after the answer was checked (keeps a batch id for later cases). */
	then?: (body: unknown) => void;
	auth?: false;
	/** A CSV answer's header row. */
	csv?: string;
}

const day = (offset: number) => new Date(Date.now() + offset * 86_400_000).toISOString().slice(0, 10);
const stats = (name: string, q: string) => `/api/v1/stats/${name}?${q}`;
const csvBody = (data: string) => () => ({ type: 'text/csv', data });
const jsonBody = (data: unknown) => () => ({ type: 'application/json', data: JSON.stringify(data) });
const importPath = (q: string) => () => `/api/v1/imports?${q}`;

// In order: the imports that later cases read and undo come first.
const CASES: Case[] = [
	// Imports
	{ route: '/api/v1/imports', method: 'POST', path: importPath('onReject=skip&fileName=week-5.csv&clientRef=contract-week-5'), body: csvBody(WITH_BAD_ROW('C-1')), status: 201, then: (b) => (batch.stored = (b as { batchId: string }).batchId) },
	{ route: '/api/v1/imports', method: 'POST', path: importPath('onReject=skip&fileName=week-5-again.csv'), body: csvBody(WITH_BAD_ROW('C-1')), status: 409 },
	{ route: '/api/v1/imports', method: 'POST', path: importPath('dryRun=1&onReject=skip'), body: csvBody(WITH_BAD_ROW('C-2')), status: 200 },
	{ route: '/api/v1/imports', method: 'POST', path: importPath('onReject=abort'), body: csvBody(WITH_BAD_ROW('C-3')), status: 422 },
	{ route: '/api/v1/imports', method: 'POST', path: importPath('onReject=abort'), body: csvBody('colour,weight\nred,3\n'), status: 422 },
	{ route: '/api/v1/imports', method: 'POST', path: importPath('onReject=abort'), body: csvBody(''), status: 422 },
	{ route: '/api/v1/imports', method: 'POST', path: importPath('onReject=abort'), body: () => ({ type: 'application/json', data: '[]' }), status: 415 },
	{ route: '/api/v1/imports', method: 'POST', path: importPath('onReject=sometimes'), body: csvBody(WITH_BAD_ROW('C-4')), status: 400 },
	{ route: '/api/v1/imports', method: 'GET', path: () => '/api/v1/imports', status: 200 },
	{ route: '/api/v1/imports', method: 'GET', path: () => '/api/v1/imports?clientRef=contract-week-5', status: 200 },
	{ route: '/api/v1/imports', method: 'GET', path: () => '/api/v1/imports?clientRef=no!', status: 400 },
	{ route: '/api/v1/imports/[id]', method: 'GET', path: () => `/api/v1/imports/${batch.stored}`, status: 200 },
	{ route: '/api/v1/imports/[id]', method: 'GET', path: () => `/api/v1/imports/${randomUUID()}`, status: 404 },
	{ route: '/api/v1/imports/[id]', method: 'GET', path: () => '/api/v1/imports/not-an-id', status: 404 },
	{ route: '/api/v1/imports/[id]/rejects.csv', method: 'GET', path: () => `/api/v1/imports/${batch.stored}/rejects.csv`, status: 200, csv: 'line,reason,row' },
	{ route: '/api/v1/imports/[id]/rejects.csv', method: 'GET', path: () => `/api/v1/imports/${randomUUID()}/rejects.csv`, status: 404 },
	{ route: '/api/v1/imports/headers', method: 'POST', path: () => '/api/v1/imports/headers', body: jsonBody({ headers: ['serial', 'family', 'cyl', 'side', 'clearance (in)', 'colour'] }), status: 200 },
	{ route: '/api/v1/imports/headers', method: 'POST', path: () => '/api/v1/imports/headers', body: jsonBody({ headers: 'serial' }), status: 400 },

	// Readings (the imported ones included, with their batch)
	{ route: '/api/v1/readings', method: 'GET', path: () => '/api/v1/readings?family=TEST-4&measurement=clearance&page=1&pageSize=20&sort=-value', status: 200 },
	{ route: '/api/v1/readings', method: 'GET', path: () => '/api/v1/readings?page=2&pageSize=5', status: 200 },
	{ route: '/api/v1/readings', method: 'GET', path: () => '/api/v1/readings?family=TEST-4&from=2026-01-01&format=json', status: 200 },
	{ route: '/api/v1/readings', method: 'GET', path: () => '/api/v1/readings?measurement=clearance&stage=as_received&format=csv', status: 200, csv: 'head_serial,family,customer,stage,cylinder,side,valve,measurement,value,unit,measured_at,measured_by,instrument,mileage_km,batch' },
	{ route: '/api/v1/readings', method: 'GET', path: () => '/api/v1/readings?format=xml', status: 400 },
	{ route: '/api/v1/readings', method: 'GET', path: () => '/api/v1/readings?family=NOPE-1&page=1', status: 404 },

	// Statistics
	{ route: '/api/v1/check', method: 'GET', path: () => '/api/v1/check?family=TEST-4&side=intake&measurement=clearance&value=0.0045&unit=in', status: 200 },
	{ route: '/api/v1/check', method: 'GET', path: () => '/api/v1/check?family=TEST-4&side=intake&measurement=clearance&stage=final&value=0.03', status: 200 },
	{ route: '/api/v1/check', method: 'GET', path: () => '/api/v1/check?family=TEST-4&side=intake&measurement=clearance', status: 400 },
	{ route: '/api/v1/check', method: 'GET', path: () => '/api/v1/check?family=NOPE-1&side=intake&measurement=clearance&value=0.05', status: 404 },
	{ route: '/api/v1/stats/distribution', method: 'GET', path: () => stats('distribution', 'measurement=clearance&family=TEST-4&side=intake&stage=as_received'), status: 200 },
	{ route: '/api/v1/stats/distribution', method: 'GET', path: () => stats('distribution', 'measurement=clearance&from=2026-01-03&to=2026-03-10'), status: 200 },
	{ route: '/api/v1/stats/distribution', method: 'GET', path: () => stats('distribution', 'measurement=margin'), status: 200 },
	{ route: '/api/v1/stats/distribution', method: 'GET', path: () => stats('distribution', 'measurement=lash'), status: 400 },
	{ route: '/api/v1/stats/distribution', method: 'GET', path: () => stats('distribution', 'measurement=clearance&family=NOPE-1'), status: 404 },
	{ route: '/api/v1/stats/compare', method: 'GET', path: () => stats('compare', 'measurement=clearance&side=intake&stage=as_received'), status: 200 },
	{ route: '/api/v1/stats/compare', method: 'GET', path: () => stats('compare', 'measurement=clearance&family=TEST-4'), status: 400 },
	{ route: '/api/v1/stats/outliers', method: 'GET', path: () => stats('outliers', 'measurement=clearance&sort=-z&page=1&pageSize=20'), status: 200 },
	{ route: '/api/v1/stats/outliers', method: 'GET', path: () => stats('outliers', 'measurement=clearance&page=9'), status: 200 },
	{ route: '/api/v1/stats/outliers', method: 'GET', path: () => stats('outliers', 'measurement=clearance&family=NOPE-1'), status: 404 },
	{ route: '/api/v1/stats/rates', method: 'GET', path: () => stats('rates', 'check=clearance&stage=as_received'), status: 200 },
	{ route: '/api/v1/stats/rates', method: 'GET', path: () => stats('rates', 'check=decision:replace_guide&family=TEST-4'), status: 200 },
	{ route: '/api/v1/stats/rates', method: 'GET', path: () => stats('rates', 'check=decision:polish'), status: 400 },
	{ route: '/api/v1/stats/comebacks', method: 'GET', path: () => stats('comebacks', 'from=2026-01-01'), status: 200 },
	{ route: '/api/v1/stats/comebacks', method: 'GET', path: () => stats('comebacks', 'family=NOPE-1'), status: 404 },
	{ route: '/api/v1/stats/first-pass', method: 'GET', path: () => stats('first-pass', 'family=TEST-4'), status: 200 },
	{ route: '/api/v1/stats/first-pass', method: 'GET', path: () => stats('first-pass', 'from=2026-01-01&machinist=nobody'), status: 200 },
	{ route: '/api/v1/stats/first-pass', method: 'GET', path: () => stats('first-pass', 'side=intake'), status: 400 },
	{ route: '/api/v1/stats/first-pass', method: 'GET', path: () => stats('first-pass', 'family=NOPE-1'), status: 404 },
	{ route: '/api/v1/stats/capability', method: 'GET', path: () => stats('capability', 'family=TEST-4&side=intake&measurement=clearance'), status: 200 },
	{ route: '/api/v1/stats/capability', method: 'GET', path: () => stats('capability', 'family=TEST-4&side=exhaust&measurement=seat_width'), status: 422 },
	{ route: '/api/v1/stats/capability', method: 'GET', path: () => stats('capability', 'family=TEST-4&side=intake&measurement=clearance&stage=as_received'), status: 400 },
	{ route: '/api/v1/stats/capability/machinists', method: 'GET', path: () => stats('capability/machinists', 'family=TEST-4&side=intake&measurement=clearance'), status: 200 },
	{ route: '/api/v1/stats/capability/machinists', method: 'GET', path: () => stats('capability/machinists', 'family=NOPE-1&side=intake&measurement=clearance'), status: 404 },
	{ route: '/api/v1/stats/control', method: 'GET', path: () => stats('control', 'family=TEST-4&side=intake&measurement=clearance&stage=final&limit=200'), status: 200 },
	{ route: '/api/v1/stats/control', method: 'GET', path: () => stats('control', 'family=NOPE-1&side=intake&measurement=clearance'), status: 404 },
	{ route: '/api/v1/stats/control', method: 'GET', path: () => stats('control', 'family=TEST-4&side=intake&measurement=clearance&rules=nelson,we4'), status: 200 },
	{ route: '/api/v1/stats/control', method: 'GET', path: () => stats('control', 'family=TEST-4&side=intake&measurement=clearance&rules=n9'), status: 400 },
	{ route: '/api/v1/stats/pchart', method: 'GET', path: () => stats('pchart', 'family=TEST-4&measurement=clearance&side=intake'), status: 200 },
	{ route: '/api/v1/stats/pchart', method: 'GET', path: () => stats('pchart', 'family=TEST-4&measurement=clearance&from=2026-02-01&to=2026-01-01'), status: 400 },
	{ route: '/api/v1/stats/pchart', method: 'GET', path: () => stats('pchart', 'family=NOPE-1&measurement=clearance'), status: 404 },
	{ route: '/api/v1/stats/wear', method: 'GET', path: () => stats('wear', 'measurement=clearance&side=intake&family=TEST-4'), status: 200 },
	{ route: '/api/v1/stats/wear', method: 'GET', path: () => stats('wear', 'measurement=clearance&mileageMin=9&mileageMax=1'), status: 400 },
	{ route: '/api/v1/stats/describe', method: 'POST', path: () => '/api/v1/stats/describe', body: jsonBody([0.051, 0.048, 0.062, 0.055, 0.049]), status: 200 },
	{ route: '/api/v1/stats/describe', method: 'POST', path: () => '/api/v1/stats/describe', body: jsonBody([]), status: 200 },
	{ route: '/api/v1/stats/describe', method: 'POST', path: () => '/api/v1/stats/describe', body: jsonBody([0.05, 'x']), status: 400 },

	// Shop and account
	{ route: '/api/v1/me', method: 'GET', path: () => '/api/v1/me', status: 200 },
	{ route: '/api/v1/me', method: 'GET', path: () => '/api/v1/me', status: 401, auth: false },
	{ route: '/api/v1/families', method: 'GET', path: () => '/api/v1/families', status: 200 },
	{ route: '/api/v1/overview', method: 'GET', path: () => '/api/v1/overview', status: 200 },
	{ route: '/api/v1/openapi.json', method: 'GET', path: () => '/api/v1/openapi.json', status: 200, auth: false },

	// Undo last: the stored batch once, then again (no longer committed), then one that is not there.
	{ route: '/api/v1/imports/[id]', method: 'DELETE', path: () => `/api/v1/imports/${batch.stored}`, status: 200 },
	{ route: '/api/v1/imports/[id]', method: 'DELETE', path: () => `/api/v1/imports/${batch.stored}`, status: 409 },
	{ route: '/api/v1/imports/[id]', method: 'DELETE', path: () => `/api/v1/imports/${randomUUID()}`, status: 404 }
];

type Doc = { paths: Record<string, Record<string, { responses: Record<string, { content?: Record<string, unknown> }> }>> };
let doc: Doc;
const ajv = new Ajv2020({ strict: false, allErrors: true, validateSchema: false });
addFormats(ajv);
const pointer = (...parts: string[]) => parts.map((p) => p.replace(/~/g, '~0').replace(/\//g, '~1')).join('/');

/** The document's schema of one answer (404 in the document is a failure, not a skip). */
function validatorFor(route: string, method: string, status: number, media: string): ValidateFunction {
	const path = openApiPath(route);
	const op = doc.paths[path]?.[method.toLowerCase()];
	expect(op, `${method} ${path} is not in the document`).toBeDefined();
	const response = op.responses[String(status)];
	expect(response, `${method} ${path} answered ${status}, which the document does not list`).toBeDefined();
	expect(Object.keys(response.content ?? {}), `${method} ${path} ${status}: media types`).toContain(media);
	const v = ajv.getSchema(`openapi#/${pointer('paths', path, method.toLowerCase(), 'responses', String(status), 'content', media, 'schema')}`);
	expect(v, `${method} ${path} ${status} ${media}: no schema`).toBeDefined();
	return v!;
}

beforeAll(async () => {
	const { shop, family, people } = await shopWithPeople(db, 'contract');
	token = newApiToken();
	await withSystem(db, (tx) => tx.insert(apiTokens).values({ shopId: shop.id, userId: people.owner.userId, name: 'contract test', prefix: token.slice(0, 10), tokenHash: sha256Hex(token), role: 'owner' }));
	await withShop(db, shop.id, async (tx) => {
		const [gauge] = await tx.insert(instruments).values({ shopId: shop.id, name: 'Bore gauge', kind: 'bore_gauge', serial: 'BG-9', calibratedOn: day(-360), intervalDays: 365 }).returning();
		const head = (serial: string, receivedOn: string, customer: string, mileageKm: number, more: Partial<typeof heads.$inferInsert> = {}) => ({ shopId: shop.id, familyId: family.id, serial, receivedOn, customer, mileageKm, ...more });
		const [h1, h2] = await tx.insert(heads).values([head('K-1', '2026-01-02', 'North Garage', 120_000, { status: 'released', releasedOn: '2026-02-01' }), head('K-2', '2026-01-02', 'South Garage', 240_000)]).returning();
		// K-1 came back a month after its release.
		const [back] = await tx.insert(heads).values(head('K-1B', '2026-03-01', 'North Garage', 131_000, { comebackOf: h1.id })).returning();
		await tx.insert(comebacks).values({ shopId: shop.id, headId: back.id, originalHeadId: h1.id, whatFailed: 'Exhaust seat leaking' });
		await tx.insert(limits).values([
			{ shopId: shop.id, familyId: family.id, measurement: 'clearance', side: 'intake', stage: 'as_received', max: 0.1, effectiveFrom: '2025-01-01' },
			{ shopId: shop.id, familyId: family.id, measurement: 'clearance', side: 'intake', stage: 'final', min: 0.025, max: 0.065, effectiveFrom: '2025-01-01' },
			{ shopId: shop.id, familyId: family.id, measurement: 'seat_width', side: 'exhaust', stage: 'final', min: 1.6, max: 1.6, effectiveFrom: '2025-01-01' }
		]);
		// [head, stage, side, measurement, cylinder, valve, value, day of 2026 (UTC), with the gauge]
		type Row = [typeof h1, 'as_received' | 'final', 'intake' | 'exhaust', 'clearance' | 'seat_width', number, number, number, number, boolean];
		const rows: Row[] = [
			...[0.041, 0.045, 0.05, 0.052, 0.06, 0.15, 0.047, 0.049].map((v, i): Row => [i % 2 ? h2 : h1, 'as_received', 'intake', 'clearance', 1 + (i % 4), 1 + (i >> 2), v, 5 + 30 * (i % 3) + i, true]),
			...[0.04, 0.045, 0.042, 0.05, 0.071].map((v, i): Row => [h1, 'final', 'intake', 'clearance', 1 + (i % 4), 1, v, 20 + i, false]),
			[h1, 'final', 'exhaust', 'seat_width', 1, 1, 1.6, 5, true]
		];
		await tx.insert(readings).values(
			rows.map(([head, stage, side, measurement, cylinder, valve, value, at, gauged]) => ({
				shopId: shop.id,
				familyId: family.id,
				headId: head.id,
				stage,
				side,
				measurement,
				cylinder,
				valve,
				value,
				measuredAt: new Date(Date.UTC(2026, 0, at, 9)),
				measuredBy: 'Ada Test',
				instrumentId: gauged ? gauge.id : null
			}))
		);
		await tx.execute(raw`insert into decisions (shop_id, head_id, cylinder, side, valve, kind)
			select ${shop.id}, ${h1.id}, c, 'intake', 1, case when c = 1 then 'replace_guide'::decision_kind else 'lap'::decision_kind end
			from generate_series(1, 4) c`);
	});
	const res = await fetch(`${baseURL}/api/v1/openapi.json`);
	expect(res.status).toBe(200);
	doc = await res.json();
	ajv.addSchema(doc as object, 'openapi');
});
afterAll(() => sql.end());

const apiOperations = Object.entries(POLICY)
	.filter(([id]) => id.startsWith('/api/v1/'))
	.flatMap(([id, policy]) => Object.keys(policy).map((method) => `${method} ${id}`));

describe('every /api/v1 answer matches the OpenAPI document', () => {
	it.each(CASES.map((c, i) => [`${c.method} ${c.route} #${i + 1} → ${c.status}`, c] as const))('%s', async (_title, c) => {
		const body = c.body?.();
		const res = await fetch(baseURL + c.path(), {
			method: c.method,
			headers: { ...(c.auth === false ? {} : { authorization: `Bearer ${token}` }), ...(body ? { 'content-type': body.type } : {}), accept: 'application/json' },
			body: body?.data
		});
		const text = await res.text();
		expect(res.status, `${c.method} ${c.path()}: ${text.slice(0, 300)}`).toBe(c.status);
		const media = (res.headers.get('content-type') ?? '').split(';')[0].trim();
		const validate = validatorFor(c.route, c.method, c.status, media);
		if (media === 'text/csv') {
			expect(c.csv, 'a CSV answer: say its header row in the case').toBeDefined();
			expect(text.split(/\r?\n/)[0]).toBe(c.csv);
			return;
		}
		expect(media).toBe('application/json');
		const json = JSON.parse(text);
		const ok = validate(json);
		expect(ok, `${c.method} ${c.path()} ${c.status}: ${JSON.stringify(validate.errors?.slice(0, 5), null, 1)}`).toBe(true);
		c.then?.(json);
	});

	it('requests every /api/v1 operation of the access policy, each with a successful answer', () => {
		const answered = new Set(CASES.filter((c) => c.status < 300).map((c) => `${c.method} ${c.route}`));
		for (const op of apiOperations) expect(answered.has(op), `add a request for ${op} to CASES`).toBe(true);
		for (const c of CASES) expect(apiOperations, `${c.method} ${c.route} is not in POLICY`).toContain(`${c.method} ${c.route}`);
	});

	it('checks a 400 and a 404 of each family of routes', () => {
		const families = { statistics: /^\/api\/v1\/(stats|check)/, readings: /^\/api\/v1\/readings/, imports: /^\/api\/v1\/imports/ };
		for (const [name, re] of Object.entries(families)) {
			for (const status of [400, 404]) expect(CASES.some((c) => re.test(c.route) && c.status === status), `${name}: a ${status}`).toBe(true);
		}
	});

	it('is strict: an answer with a field the contract does not have, or without one it has, fails', () => {
		const validate = validatorFor('/api/v1/stats/describe', 'POST', 200, 'application/json');
		const empty = { n: 0, mean: null, sd: null, min: null, max: null, quantiles: { p05: null, p25: null, p50: null, p75: null, p95: null }, iqr: null, mad: null, madScaled: null, fences: { low: null, high: null }, tukeyOutside: 0, histogram: [], lag1Autocorrelation: null };
		expect(validate(empty)).toBe(true);
		expect(validate({ ...empty, extra: 1 })).toBe(false);
		const { madScaled: _m, ...missing } = empty;
		expect(validate(missing)).toBe(false);
	});
});
