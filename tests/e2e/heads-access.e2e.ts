// The head workflow over plain HTTP, as a script or a browser without JavaScript: viewers read
// but change nothing (403 on every action, the data untouched), only an owner releases over a
// failing check, another shop's head is 404, and the grid's form works without JavaScript.
import { and, count, eq } from 'drizzle-orm';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { auditLog, heads, readings } from '../../src/lib/server/db/schema';
import { saveEntries } from '../../src/lib/server/services/entry';
import { intakeHead } from '../../src/lib/server/services/heads';
import { today } from '../../src/lib/server/services/head-view';
import { insertInstrument } from '../../src/lib/server/queries/instruments';
import { makeShop, testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { shopWithPeople, type TestPerson } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
let shopId: string;
let familyId: string;
let headId: string;
let otherHeadId: string;
let instrumentId: string;
let people: Record<string, TestPerson>;
let slug: string;
const clients: Record<string, Client> = {};

beforeAll(async () => {
	const s = await shopWithPeople(db, 'headroles');
	shopId = s.shop.id;
	familyId = s.family.id;
	people = s.people;
	slug = s.shop.slug;
	const who = { userId: people.machinist.userId, label: people.machinist.email, name: 'Test Machinist' };
	const r = await withShop(db, shopId, (tx) =>
		intakeHead(tx, shopId, who, {
			serial: 'ROLES-1',
			familyId,
			customer: 'Invented Roles Garage',
			customerEmail: 'service@roles.example',
			receivedOn: today(),
			usageUnit: 'km',
			usage: 1000,
			complaint: '',
			leakMode: 'pct',
			pressureUnit: 'psi',
			leaks: []
		})
	);
	if (!r.ok) throw new Error(r.message);
	headId = r.head.id;
	// Final seal tests that fail everywhere, so a release needs an owner's override.
	await withShop(db, shopId, (tx) =>
		saveEntries(tx, shopId, who, headId, 'final', { cells: [{ pos: '1-intake-1', field: 'vacuum_hold', text: '70' }], units: {}, instruments: {} })
	);
	instrumentId = (
		await withShop(db, shopId, (tx) =>
			insertInstrument(tx, { shopId, name: 'Roles micrometer', kind: 'micrometer', serial: 'ROLES-MIC', resolutionMm: 0.001, calibratedOn: today(), intervalDays: 365 }, people.owner.userId)
		)
	).id;
	const other = await makeShop(db, 'elsewhere');
	const o = await withShop(db, other.shop.id, (tx) =>
		intakeHead(tx, other.shop.id, who, {
			serial: 'ELSEWHERE-1',
			familyId: other.family.id,
			customer: 'Someone else',
			customerEmail: null,
			receivedOn: today(),
			usageUnit: 'km',
			usage: null,
			complaint: '',
			leakMode: 'pct',
			pressureUnit: 'psi',
			leaks: []
		})
	);
	if (!o.ok) throw new Error(o.message);
	otherHeadId = o.head.id;
	for (const role of ['owner', 'engineer', 'machinist', 'viewer']) {
		const c = new Client(baseURL);
		await c.signIn(people[role].email, people[role].password);
		expect(c.signedIn, `signed in as ${role}`).toBe(true);
		clients[role] = c;
	}
});
afterAll(() => sql.end());

const post = (role: string, path: string, form: Record<string, string>) => clients[role].request('POST', path, { form });

async function snapshot() {
	return withShop(db, shopId, async (tx) => {
		const [a] = await tx.select({ n: count() }).from(auditLog).where(eq(auditLog.shopId, shopId));
		const [r] = await tx.select({ n: count() }).from(readings).where(eq(readings.shopId, shopId));
		const [h] = await tx.select().from(heads).where(eq(heads.id, headId));
		return { audit: a.n, readings: r.n, status: h.status, released: h.releasedOn };
	});
}

describe('a viewer', () => {
	it('opens the heads, the head, its grid, its decisions and its report', async () => {
		for (const path of ['/heads', `/heads/${headId}`, `/heads/${headId}/entry/as-received`, `/heads/${headId}/entry/final`, `/heads/${headId}/decisions`, `/heads/${headId}/report`]) {
			const res = await clients.viewer.get(path);
			expect(res.status, path).toBe(200);
		}
		const report = await (await clients.viewer.get(`/heads/${headId}/report`)).text();
		expect(report).toContain('Head report ROLES-1');
		expect(report).toContain('A valve that drops into a cylinder destroys the engine.');
	});

	it('is refused every change with 403, and nothing changes', async () => {
		const before = await snapshot();
		const attempts: [string, Record<string, string>][] = [
			['/heads/new', { serial: 'VIEWER-1', familyId, customer: 'x', customerEmail: '', receivedOn: today(), usageUnit: 'km', usage: '', complaint: '', leakMode: 'pct', pressureUnit: 'psi' }],
			[`/heads/${headId}?/release`, {}],
			[`/heads/${headId}?/release`, { override: 'on', reason: 'A viewer should never get here.' }],
			[`/heads/${headId}?/emailReport`, {}],
			[`/heads/${headId}?/comeback`, { returnedOn: today(), usageUnit: 'km', usage: '', whatFailed: 'Nothing', positions: '1-intake-1' }],
			[`/heads/${headId}/entry/as-received?/save`, { 'c|1-intake-1|margin': '1.2', 'unit|margin': 'mm' }],
			[`/heads/${headId}/entry/final?/save`, { 'c|1-intake-1|vacuum_hold': '99' }],
			[`/heads/${headId}/decisions?/decide`, { pos: '1-intake-1', kind: 'lap', note: '' }],
			[`/heads/${headId}/decisions?/acceptAll`, {}],
			['/families?/create', { code: 'VIEW-1', description: '', cylinders: '4', intakeValves: '1', exhaustValves: '1', stemUnit: 'mm', intakeStem: '', exhaustStem: '' }],
			['/families?/sealPass', { vacuumHoldPassPct: '50', fluidHoldPassSeconds: '10' }],
			[`/families/${familyId}?/update`, { code: 'RENAMED', description: '', cylinders: '4', intakeValves: '2', exhaustValves: '2', stemUnit: 'mm', intakeStem: '', exhaustStem: '' }],
			[`/families/${familyId}?/limit`, { stage: 'final', measurement: 'vacuum_hold', side: 'both', unit: 'pct', min: '10', max: '', effectiveFrom: today(), note: '' }],
			['/instruments?/create', { name: 'Viewer gauge', kind: 'caliper', serial: 'V-1', resolution: '', resolutionUnit: 'mm', calibratedOn: today(), intervalDays: '365' }],
			['/instruments?/calibrate', { id: instrumentId, calibratedOn: today(), intervalDays: '30', note: '' }],
			['/instruments?/retire', { id: instrumentId, retired: 'yes' }]
		];
		for (const [path, form] of attempts) {
			const res = await post('viewer', path, form);
			expect(res.status, `viewer POST ${path}`).toBe(403);
		}
		expect(await snapshot()).toEqual(before);
	});
});

describe('release over a failing check', () => {
	it('is refused to a machinist even when asked for, and allowed to an owner with a reason', async () => {
		const blocked = await post('machinist', `/heads/${headId}?/release`, {});
		expect(blocked.status).toBe(409);
		expect(await blocked.text()).toContain('cannot be released');
		const sneaky = await post('machinist', `/heads/${headId}?/release`, { override: 'on', reason: 'The customer is waiting outside.' });
		expect(sneaky.status).toBe(403);
		expect((await snapshot()).status).not.toBe('released');
		const short = await post('owner', `/heads/${headId}?/release`, { override: 'on', reason: 'ok' });
		expect(short.status).toBe(400);
		const ok = await post('owner', `/heads/${headId}?/release`, { override: 'on', reason: 'Customer collects for a bench run only; seal test to be repeated.' });
		expect(ok.status).toBe(200);
		const after = await snapshot();
		expect(after.status).toBe('released');
		const override = await withShop(db, shopId, (tx) => tx.select().from(auditLog).where(and(eq(auditLog.entityId, headId), eq(auditLog.action, 'override'))));
		expect(override).toHaveLength(1);
		expect(override[0].actorLabel).toBe(people.owner.email);
		// Released: the grid refuses new values.
		const closed = await post('machinist', `/heads/${headId}/entry/final?/save`, { 'c|1-intake-1|vacuum_hold': '99' });
		expect(closed.status).toBe(409);
	});
});

describe('tenancy', () => {
	it('answers 404 for another shop’s head, on every page and action', async () => {
		for (const path of [`/heads/${otherHeadId}`, `/heads/${otherHeadId}/entry/as-received`, `/heads/${otherHeadId}/decisions`, `/heads/${otherHeadId}/report`]) {
			expect((await clients.owner.get(path)).status, path).toBe(404);
		}
		expect((await post('owner', `/heads/${otherHeadId}/entry/as-received?/save`, { 'c|1-intake-1|margin': '1.2' })).status).toBe(404);
		expect((await post('owner', `/heads/${otherHeadId}?/emailReport`, {})).status).toBe(404);
		expect((await post('owner', `/heads/${otherHeadId}/decisions?/decide`, { pos: '1-intake-1', kind: 'lap', note: '' })).status).toBe(404);
		expect((await clients.owner.get('/heads/not-a-head-id')).status).toBe(404);
	});
});

describe('the grid without JavaScript', () => {
	it('saves what changed from a whole-grid post, and refuses a bad value with nothing saved', async () => {
		const who = { userId: people.machinist.userId, label: people.machinist.email, name: 'Test Machinist' };
		const r = await withShop(db, shopId, (tx) =>
			intakeHead(tx, shopId, who, { serial: 'ROLES-2', familyId, customer: 'Invented Roles Garage', customerEmail: null, receivedOn: today(), usageUnit: 'km', usage: null, complaint: '', leakMode: 'pct', pressureUnit: 'psi', leaks: [] })
		);
		if (!r.ok) throw new Error(r.message);
		const id = r.head.id;
		const count = () => withShop(db, shopId, async (tx) => (await tx.select().from(readings).where(eq(readings.headId, id))).length);
		const bad = await post('machinist', `/heads/${id}/entry/as-received?/save`, {
			'c|1-intake-1|margin': '1.2',
			'o|1-intake-1|margin': '',
			'c|1-intake-1|seat_width': '1.2.3',
			'o|1-intake-1|seat_width': '',
			'unit|margin': 'mm'
		});
		expect(bad.status).toBe(400);
		expect(await bad.text()).toContain('is not a number');
		expect(await count()).toBe(0);
		const good = await post('machinist', `/heads/${id}/entry/as-received?/save`, {
			'c|1-intake-1|margin': '0.05',
			'o|1-intake-1|margin': '',
			'c|1-intake-1|seat_width': '',
			'o|1-intake-1|seat_width': '',
			'unit|margin': 'in'
		});
		expect(good.status).toBe(200);
		const rows = await withShop(db, shopId, (tx) => tx.select().from(readings).where(eq(readings.headId, id)));
		expect(rows.map((x) => [x.measurement, x.value, x.measuredBy])).toEqual([['margin', 1.27, `machinist of ${slug}`]]);
	});
});
