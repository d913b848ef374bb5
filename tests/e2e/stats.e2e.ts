// The statistics routes over HTTP against the built app: each answers with its JSON shape, and
// bad input to each is a clear 4xx, never a 500, and no response carries NaN. Numbers are checked
// in depth in tests/integration/stats.spec.ts; here the point is the wire.
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { demoSignIns } from '../../src/lib/server/demo/generate';
import { withShop } from '../../src/lib/server/db/scope';
import { heads, limits, readings } from '../../src/lib/server/db/schema';
import { raw, testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { shopWithPeople } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
const viewer = new Client(baseURL);

const CLEARANCES = [0.041, 0.045, 0.05, 0.052, 0.06, 0.15];

beforeAll(async () => {
	const { shop, family, people } = await shopWithPeople(db, 'stats-http');
	await withShop(db, shop.id, async (tx) => {
		const [h1, h2] = await tx
			.insert(heads)
			.values([
				{ shopId: shop.id, familyId: family.id, serial: 'W-1', receivedOn: '2026-01-02', customer: 'North Garage', mileageKm: 120_000, status: 'released', releasedOn: '2026-02-01' },
				{ shopId: shop.id, familyId: family.id, serial: 'W-2', receivedOn: '2026-01-02', customer: 'South Garage', mileageKm: 240_000 }
			])
			.returning();
		await tx.insert(limits).values([
			{ shopId: shop.id, familyId: family.id, measurement: 'clearance', side: 'intake', stage: 'as_received', max: 0.1, effectiveFrom: '2025-01-01' },
			{ shopId: shop.id, familyId: family.id, measurement: 'clearance', side: 'intake', stage: 'final', min: 0.025, max: 0.065, effectiveFrom: '2025-01-01' }
		]);
		const r = (over: Partial<typeof readings.$inferInsert>) => ({
			shopId: shop.id,
			headId: h1.id,
			familyId: family.id,
			stage: 'as_received' as const,
			cylinder: 1,
			side: 'intake' as const,
			valve: 1,
			measurement: 'clearance' as const,
			value: 0.05,
			measuredAt: new Date('2026-01-05T09:00:00Z'),
			measuredBy: 'Ada Test',
			...over
		});
		await tx.insert(readings).values([
			...CLEARANCES.map((value, i) => r({ headId: i % 2 ? h2.id : h1.id, cylinder: 1 + (i >> 1), value })),
			r({ stage: 'final', side: 'exhaust', value: 0.05 }),
			...[1, 2, 3].map((cylinder) => r({ measurement: 'seat_runout', cylinder, value: 0.02 })),
			...[0.04, 0.045, 0.042, 0.05].map((value, i) => r({ stage: 'final', cylinder: i + 1, value, measuredAt: new Date(Date.UTC(2026, 0, 20 + i)) }))
		]);
		// A decision per intake position of W-1: one guide replaced, three lapped.
		await tx.execute(raw`insert into decisions (shop_id, head_id, cylinder, side, valve, kind)
			select ${shop.id}, ${h1.id}, c, 'intake', 1, case when c = 1 then 'replace_guide'::decision_kind else 'lap'::decision_kind end
			from generate_series(1, 4) c`);
	});
	const res = await viewer.signIn(people.viewer.email, people.viewer.password);
	expect([302, 303]).toContain(res.status);
});
afterAll(() => sql.end());

async function get(path: string, client: Client = viewer) {
	const res = await client.get(path, { accept: 'application/json' });
	const text = await res.text();
	expect(text, `${path} must not send NaN or Infinity`).not.toMatch(/NaN|Infinity/);
	return { status: res.status, body: JSON.parse(text) };
}

const F = 'family=TEST-4&side=intake&stage=as_received';

describe('each route answers with its shape', () => {
	it('distribution', async () => {
		const { status, body } = await get(`/api/v1/stats/distribution?measurement=clearance&${F}`);
		expect(status).toBe(200);
		expect(body).toMatchObject({ measurement: 'clearance', unit: 'mm', n: 6, source: 'summaries', tukeyOutside: 1 });
		expect(body.quantiles.p50).toBeCloseTo(0.051, 15);
		expect(body.limits).toEqual({ min: null, max: 0.1, effectiveFrom: '2025-01-01' });
		expect(body.outside).toEqual({ below: 0, above: 1, judged: 6, share: 1 / 6 });
		expect(Array.isArray(body.histogram)).toBe(true);
		expect(body.filters).toEqual({ family: 'TEST-4', side: 'intake', stage: 'as_received' });
	});

	it('compare', async () => {
		const { status, body } = await get('/api/v1/stats/compare?measurement=clearance&side=intake&stage=as_received');
		expect(status).toBe(200);
		expect(body.families.map((f: { family: { code: string }; n: number }) => [f.family.code, f.n])).toEqual([['TEST-4', 6]]);
	});

	it('check', async () => {
		const { status, body } = await get(`/api/v1/check?${F}&measurement=clearance&value=0.0045&unit=in`);
		expect(status).toBe(200);
		expect(body).toMatchObject({ value: 0.1143, unit: 'mm', withinLimits: false, broken: 'max', tukey: 'high' });
		expect(body.suggestion.decision).toBe('replace_guide');
		expect(typeof body.percentile).toBe('number');
	});

	it('outliers', async () => {
		const { status, body } = await get(`/api/v1/stats/outliers?measurement=clearance&${F}&sort=-value&pageSize=10`);
		expect(status).toBe(200);
		expect(body.total).toBe(1);
		expect(body.items[0]).toMatchObject({ value: 0.15, serial: 'W-2', cylinder: 3 });
		expect(body.items[0].reasons.map((r: { code: string }) => r.code)).toContain('above_limit');
	});

	it('rates, by measurement and by decision; comebacks', async () => {
		const m = await get('/api/v1/stats/rates?check=clearance&family=TEST-4');
		expect(m.status).toBe(200);
		expect(m.body.bySide.intake).toMatchObject({ failures: 1, n: 6 });
		expect(m.body.byCylinder.length).toBe(3);
		const d = await get('/api/v1/stats/rates?check=decision:replace_guide');
		expect(d.body.overall).toMatchObject({ failures: 1, n: 4, rate: 0.25 });
		const c = await get('/api/v1/stats/comebacks?family=TEST-4');
		expect(c.body.overall).toMatchObject({ failures: 0, n: 1, rate: 0 });
	});

	it('capability, control chart and wear', async () => {
		const cap = await get('/api/v1/stats/capability?family=TEST-4&side=intake&measurement=clearance');
		expect(cap.status).toBe(200);
		expect(cap.body).toMatchObject({ n: 4, stage: 'final', limits: { min: 0.025, max: 0.065 } });
		expect(typeof cap.body.cpk).toBe('number');
		const ctl = await get('/api/v1/stats/control?family=TEST-4&side=intake&measurement=clearance&limit=3');
		expect(ctl.body).toMatchObject({ n: 3, total: 4 });
		expect(ctl.body.points.map((p: { value: number }) => p.value)).toEqual([0.045, 0.042, 0.05]);
		const w = await get('/api/v1/stats/wear?family=TEST-4&side=intake');
		expect(w.body).toMatchObject({ measurement: 'clearance', stage: 'as_received', n: 6, sampled: false });
		expect(w.body.band.length).toBe(41);
	});

	it('describe', async () => {
		const res = await viewer.request('POST', '/api/v1/stats/describe', { json: [3, 1, 2, 4], headers: { accept: 'application/json' } });
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body).toMatchObject({ n: 4, mean: 2.5, min: 1, max: 4, tukeyOutside: 0 });
		expect(body.quantiles.p50).toBe(2.5);
		// NIST StRD definition, by hand: Σ(y_i − 2.5)(y_{i−1} − 2.5) = −0.75, Σ(y − 2.5)² = 5.
		expect(body.lag1Autocorrelation).toBeCloseTo(-0.15, 12);
	});

	it('a demo API token reads the demo shop (Bearer), from the summaries', async () => {
		const owner = demoSignIns().find((s) => s.shop === 'brackenford' && s.role === 'owner')!;
		const res = await fetch(`${baseURL}/api/v1/stats/distribution?measurement=clearance&family=ALDER-4&side=exhaust&stage=as_received`, {
			headers: { authorization: `Bearer ${owner.token}`, accept: 'application/json' }
		});
		expect(res.status).toBe(200);
		const body = await res.json();
		expect(body.n).toBeGreaterThan(0);
		expect(body.source).toBe('summaries');
	});
});

describe('undefined statistics are null', () => {
	it('an empty selection: n = 0 and nulls', async () => {
		const { status, body } = await get('/api/v1/stats/distribution?measurement=margin&family=TEST-4');
		expect(status).toBe(200);
		expect(body).toMatchObject({ n: 0, mean: null, sd: null, mad: null, histogram: [], outside: { share: null } });
	});

	it('n = 1: no SD', async () => {
		const { body } = await get('/api/v1/stats/distribution?measurement=clearance&family=TEST-4&side=exhaust&stage=final');
		expect([body.n, body.sd, body.mean]).toEqual([1, null, 0.05]);
	});

	it('all values equal: SD 0, MAD 0, no robust z', async () => {
		const d = await get(`/api/v1/stats/distribution?measurement=seat_runout&${F}`);
		expect([d.body.n, d.body.sd, d.body.mad]).toEqual([3, 0, 0]);
		const c = await get(`/api/v1/check?${F}&measurement=seat_runout&value=0.02`);
		expect(c.body.robustZ).toBeNull();
	});

	it('describe: [] and [5]', async () => {
		const empty = await (await viewer.request('POST', '/api/v1/stats/describe', { json: [] })).json();
		expect([empty.n, empty.mean, empty.lag1Autocorrelation]).toEqual([0, null, null]);
		const one = await (await viewer.request('POST', '/api/v1/stats/describe', { json: [5] })).json();
		expect([one.n, one.mean, one.sd]).toEqual([1, 5, null]);
	});
});

describe('bad input is a clear 4xx on every route', () => {
	const cases: Array<[string, number, RegExp]> = [
		['/api/v1/stats/distribution?measurement=clearance&family=NOPE', 404, /No engine family "NOPE" in this shop/],
		['/api/v1/stats/distribution?measurement=wobble', 400, /measurement must be one of/],
		['/api/v1/stats/distribution', 400, /measurement must be one of/],
		['/api/v1/stats/distribution?measurement=clearance&colour=red', 400, /unknown parameter: colour/],
		['/api/v1/stats/distribution?measurement=clearance&from=2026-03-01&to=2026-02-01', 400, /from must not be after to/],
		['/api/v1/stats/compare?measurement=wobble', 400, /measurement must be one of/],
		['/api/v1/stats/compare?measurement=clearance&family=TEST-4', 400, /unknown parameter: family/],
		[`/api/v1/check?${F}&measurement=clearance&value=abc`, 400, /value must be a number/],
		[`/api/v1/check?${F}&measurement=clearance`, 400, /value is required/],
		['/api/v1/check?family=NOPE&side=intake&measurement=clearance&value=0.05', 404, /No engine family/],
		[`/api/v1/check?${F}&measurement=vacuum_hold&value=95&unit=mm`, 400, /unit mm does not fit vacuum_hold/],
		[`/api/v1/check?${F}&measurement=wobble&value=1`, 400, /measurement must be one of/],
		['/api/v1/stats/outliers?measurement=clearance&pageSize=0', 400, /pageSize must be at least 1/],
		['/api/v1/stats/outliers?measurement=clearance&family=NOPE', 404, /No engine family/],
		['/api/v1/stats/outliers?measurement=wobble', 400, /measurement must be one of/],
		['/api/v1/stats/rates?check=paint', 400, /check must be a measurement/],
		['/api/v1/stats/rates?check=clearance&family=NOPE', 404, /No engine family/],
		['/api/v1/stats/rates?check=decision:lap&stage=final', 400, /stage does not apply/],
		['/api/v1/stats/comebacks?family=NOPE', 404, /No engine family/],
		['/api/v1/stats/comebacks?from=yesterday', 400, /from must be a date/],
		['/api/v1/stats/capability?family=TEST-4&side=intake&measurement=clearance&stage=as_received', 400, /stage must be final/],
		['/api/v1/stats/capability?family=TEST-4&measurement=clearance', 400, /side must be one of/],
		['/api/v1/stats/capability?family=NOPE&side=intake&measurement=clearance', 404, /No engine family/],
		['/api/v1/stats/control?family=TEST-4&side=intake&measurement=clearance&limit=1', 400, /limit must be at least 2/],
		['/api/v1/stats/control?family=NOPE&side=intake&measurement=clearance', 404, /No engine family/],
		['/api/v1/stats/wear?measurement=wobble', 400, /measurement must be one of/],
		['/api/v1/stats/wear?family=NOPE', 404, /No engine family/],
		['/api/v1/stats/wear?mileageMin=300000&mileageMax=100000', 400, /mileageMin must not be above mileageMax/]
	];
	it.each(cases)('%s → %i', async (path, status, message) => {
		const res = await get(path);
		expect(res.status).toBe(status);
		expect(res.body.message).toMatch(message);
	});

	it('describe: 100,001 numbers → 413 saying the limit; not JSON, not an array, not numbers → 400', async () => {
		const big = await viewer.request('POST', '/api/v1/stats/describe', { json: new Array(100_001).fill(0.05) });
		expect(big.status).toBe(413);
		expect((await big.json()).message).toBe('Send at most 100000 numbers in one request. This one has 100001.');
		const exactly = await viewer.request('POST', '/api/v1/stats/describe', { json: new Array(100_000).fill(0.05) });
		expect(exactly.status).toBe(200);
		for (const [body, message] of [
			['[1, 2,', /not valid JSON/],
			['{"values": [1, 2]}', /JSON array of numbers/],
			['[1, "2"]', /every element must be a finite number/],
			['', /Send a JSON body/]
		] as const) {
			const res = await viewer.request('POST', '/api/v1/stats/describe', { body, headers: { 'content-type': 'application/json', accept: 'application/json' } });
			expect(res.status, body).toBe(400);
			expect((await res.json()).message).toMatch(message);
		}
	});

	it('signed out: 401', async () => {
		const res = await get('/api/v1/stats/distribution?measurement=clearance', new Client(baseURL));
		expect(res.status).toBe(401);
	});
});
