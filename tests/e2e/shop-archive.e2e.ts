// The owner's archive over HTTP: the zip holds one CSV per shop-owned table whose row counts
// equal the database's, nothing of another shop, formula cells neutralised; other roles 403.
import Papa from 'papaparse';
import yauzl from 'yauzl';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { withShop, withSystem } from '../../src/lib/server/db/scope';
import { auditLog, cylinderLeakage, heads, instrumentCalibrations, instruments, limits, readings } from '../../src/lib/server/db/schema';
import { raw, testDb } from '../helpers/db';
import { Client } from '../helpers/http';
import { shopWithPeople } from '../helpers/people';

const baseURL = inject('baseURL');
const { db, sql } = testDb();
let shopId: string;
let otherShopId: string;
let otherSerial: string;
const clients: Record<string, Client> = {};
const FORMULA_CUSTOMER = '=HYPERLINK("http://example.invalid/x","click")';

function unzip(buf: Buffer): Promise<Map<string, string>> {
	return new Promise((resolve, reject) => {
		yauzl.fromBuffer(buf, { lazyEntries: true }, (err, zip) => {
			if (err || !zip) return reject(err);
			const files = new Map<string, string>();
			zip.on('entry', (entry: yauzl.Entry) => {
				zip.openReadStream(entry, (e, stream) => {
					if (e || !stream) return reject(e);
					const parts: Buffer[] = [];
					stream.on('data', (d: Buffer) => parts.push(d));
					stream.on('end', () => {
						files.set(entry.fileName, Buffer.concat(parts).toString('utf8'));
						zip.readEntry();
					});
				});
			});
			zip.on('end', () => resolve(files));
			zip.on('error', reject);
			zip.readEntry();
		});
	});
}

const parse = (text: string) => Papa.parse<string[]>(text.trimEnd(), { skipEmptyLines: true }).data;

beforeAll(async () => {
	const { shop, family, people } = await shopWithPeople(db, 'archive');
	shopId = shop.id;
	const other = await shopWithPeople(db, 'archive-other');
	otherShopId = other.shop.id;
	otherSerial = `OTHER-${other.shop.slug}`;
	await withShop(db, otherShopId, (tx) => tx.insert(heads).values({ shopId: otherShopId, familyId: other.family.id, serial: otherSerial, receivedOn: '2026-01-02' }));
	await withShop(db, shopId, async (tx) => {
		const hs = await tx
			.insert(heads)
			.values([
				{ shopId, familyId: family.id, serial: 'ARC-1', receivedOn: '2026-01-02', customer: FORMULA_CUSTOMER, mileageKm: 120_000 },
				{ shopId, familyId: family.id, serial: 'ARC-2', receivedOn: '2026-01-03', customer: 'Plain, "quoted" Garage' }
			])
			.returning();
		const rows: (typeof readings.$inferInsert)[] = [];
		for (const h of hs)
			for (let c = 1; c <= 4; c++)
				for (const side of ['intake', 'exhaust'] as const)
					for (const stage of ['as_received', 'final'] as const)
						rows.push({ shopId, headId: h.id, familyId: family.id, stage, cylinder: c, side, valve: 1, measurement: 'clearance', value: c / 100, measuredAt: new Date(Date.UTC(2026, 0, 5, 8, c)), measuredBy: 'Ada Test' });
		await tx.insert(readings).values(rows);
		await tx.insert(cylinderLeakage).values({ shopId, headId: hs[0].id, cylinder: 1, leakagePct: 7.5 });
		await tx.insert(limits).values({ shopId, familyId: family.id, stage: 'final', measurement: 'clearance', side: 'intake', min: 0.02, max: 0.06, effectiveFrom: '2025-01-01' });
		const [g] = await tx.insert(instruments).values({ shopId, name: 'Bore gauge 1', kind: 'bore_gauge', serial: 'BG-1', calibratedOn: '2026-01-01', intervalDays: 180 }).returning();
		await tx.insert(instrumentCalibrations).values({ shopId, instrumentId: g.id, calibratedOn: '2026-01-01', intervalDays: 180 });
		await tx.insert(auditLog).values({ shopId, actorUserId: people.owner.userId, actorLabel: people.owner.email, entity: 'head', entityId: hs[0].id, action: 'create', after: { serial: 'ARC-1' } });
	});
	for (const role of ['owner', 'engineer', 'viewer'] as const) {
		const c = new Client(baseURL);
		const res = await c.signIn(people[role].email, people[role].password);
		expect([302, 303]).toContain(res.status);
		clients[role] = c;
	}
});
afterAll(() => sql.end());

describe('GET /settings/shop/archive.zip', () => {
	it('gives the owner every shop-owned table with the database row counts, and nothing of another shop', async () => {
		const page = await clients.owner.get('/settings/shop');
		expect(page.status).toBe(200);
		expect(await page.text()).toContain('Download everything');

		const res = await clients.owner.get('/settings/shop/archive.zip');
		expect(res.status).toBe(200);
		expect(res.headers.get('content-type')).toBe('application/zip');
		expect(res.headers.get('content-disposition')).toMatch(/^attachment; filename="lapmark-archive-[a-z0-9-]+-\d{4}-\d{2}-\d{2}\.zip"$/);
		const files = await unzip(Buffer.from(await res.arrayBuffer()));

		// The tables that carry a shop_id, less the documented exceptions, one file each.
		const tables = await withSystem(db, (tx) =>
			tx.execute<{ table_name: string }>(raw`
				select c.table_name from information_schema.columns c
				join information_schema.tables t on t.table_schema = c.table_schema and t.table_name = c.table_name and t.table_type = 'BASE TABLE'
				where c.table_schema = current_schema() and c.column_name = 'shop_id'
				order by 1`)
		);
		const skipped = ['mail_outbox', 'shop_signups', 'reading_summaries', 'reading_value_counts', 'reading_value_totals', 'reading_position_tallies'];
		const expectedTables = tables.map((t) => t.table_name).filter((t) => !skipped.includes(t));
		for (const t of ['heads', 'readings', 'decisions', 'limits', 'instruments', 'instrument_calibrations', 'comebacks', 'audit_log', 'families', 'memberships', 'cylinder_leakage', 'bore_readings', 'import_batches', 'api_tokens', 'invitations'])
			expect(expectedTables).toContain(t);
		expect([...files.keys()].sort()).toEqual(['manifest.csv', 'shop.csv', ...expectedTables.map((t) => `${t}.csv`)].sort());

		const manifest = new Map(parse(files.get('manifest.csv')!).slice(1).map(([file, , rows]) => [file, Number(rows)]));
		for (const table of expectedTables) {
			const [{ n }] = await withSystem(db, (tx) => tx.execute<{ n: number }>(raw`select count(*)::int as n from ${raw.identifier(table)} where shop_id = ${shopId}`));
			const rows = parse(files.get(`${table}.csv`)!);
			expect(rows.length - 1, `${table}.csv rows`).toBe(n);
			expect(manifest.get(`${table}.csv`), `manifest of ${table}`).toBe(n);
		}
		expect(manifest.get('readings.csv')).toBe(32);
		expect(manifest.get('heads.csv')).toBe(2);
		expect(manifest.get('memberships.csv')).toBe(4);
		expect(manifest.get('instrument_calibrations.csv')).toBe(1);
		expect(parse(files.get('shop.csv')!)[1].slice(0, 1)).toEqual([shopId]);

		// Every shop_id column holds this shop; the other shop's id and head never appear.
		const all = [...files.values()].join('\n');
		expect(all).not.toContain(otherShopId);
		expect(all).not.toContain(otherSerial);
		for (const table of expectedTables) {
			const [header, ...rows] = parse(files.get(`${table}.csv`)!);
			const col = header.indexOf('shop_id');
			expect(col, `${table} has shop_id`).toBeGreaterThanOrEqual(0);
			for (const r of rows) expect(r[col]).toBe(shopId);
		}
		// Formula cells neutralised, numbers as numbers, secrets left out.
		const headRows = parse(files.get('heads.csv')!);
		const customer = headRows[0].indexOf('customer');
		expect(headRows.slice(1).map((r) => r[customer]).sort()).toEqual([`'${FORMULA_CUSTOMER}`, 'Plain, "quoted" Garage']);
		const readingRows = parse(files.get('readings.csv')!);
		expect(readingRows.slice(1).map((r) => r[readingRows[0].indexOf('value')])).toContain('0.01');
		expect(parse(files.get('api_tokens.csv')!)[0]).not.toContain('token_hash');
		expect(parse(files.get('memberships.csv')!)[0]).toEqual(['shop_id', 'user_id', 'email', 'name', 'role', 'created_at']);
	});

	it('refuses every other role with 403', async () => {
		for (const role of ['engineer', 'viewer'] as const) {
			expect((await clients[role].get('/settings/shop/archive.zip')).status, role).toBe(403);
			expect((await clients[role].get('/settings/shop')).status, role).toBe(403);
		}
		expect((await new Client(baseURL).get('/settings/shop/archive.zip')).status).toBe(303);
	});
});
