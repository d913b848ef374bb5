// The readings behind GET /api/v1/readings against the real database: every filter selects
// exactly the readings a plain reading of its definition selects (checked on random filter
// combinations against the same rows filtered in TypeScript), pages sort and count in SQL, the
// export query streams the same rows in time order through a cursor, and row-level security
// keeps another shop's readings out even though the export runs as raw SQL.
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MEASUREMENT_INFO, type Measurement, type Side, type Stage } from '../../src/lib/measurements';
import { readingsQuerySchema, type ReadingsQuery } from '../../src/lib/schemas/readings';
import { withShop } from '../../src/lib/server/db/scope';
import { families, heads, instruments, readings } from '../../src/lib/server/db/schema';
import { exportQuery } from '../../src/lib/server/queries/readings';
import { readingSelection, readingsPageOf } from '../../src/lib/server/services/readings';
import { makeShop, testDb } from '../helpers/db';

const { db, sql } = testDb();
let shopId: string;
let otherShopId: string;

type Fixture = {
	id: number;
	family: string;
	serial: string;
	customer: string;
	mileageKm: number | null;
	stage: Stage;
	side: Side;
	measurement: Measurement;
	value: number;
	measuredAt: Date;
	measuredBy: string;
};
const rows: Fixture[] = [];

const HEADS = [
	{ serial: 'R-1', family: 'TEST-4', customer: 'North Garage', mileageKm: 80_000 },
	{ serial: 'R-2', family: 'TEST-4', customer: 'south garage', mileageKm: 150_000 },
	{ serial: 'R-3', family: 'TEST-6', customer: 'North Garage', mileageKm: null },
	{ serial: 'R-4', family: 'TEST-6', customer: 'Hill Transport', mileageKm: 240_000 }
] as const;
const MEASURED: Measurement[] = ['clearance', 'seat_width', 'vacuum_hold'];
const MACHINISTS = ['Ada Test', 'Ben Test', 'ada test'];

beforeAll(async () => {
	const ctx = await makeShop(db, 'readings');
	shopId = ctx.shop.id;
	const other = await makeShop(db, 'readings-other');
	otherShopId = other.shop.id;
	await withShop(db, shopId, async (tx) => {
		const [six] = await tx
			.insert(families)
			.values({ shopId, code: 'TEST-6', description: '', cylinders: 6, intakeValves: 1, exhaustValves: 1, intakeStemMm: 7, exhaustStemMm: 7 })
			.returning();
		const familyIds: Record<string, string> = { 'TEST-4': ctx.family.id, 'TEST-6': six.id };
		const [gauge] = await tx.insert(instruments).values({ shopId, name: 'Bore gauge', kind: 'bore_gauge', serial: 'BG-7', resolutionMm: 0.001, calibratedOn: '2025-12-01', intervalDays: 365 }).returning();
		const made = await tx
			.insert(heads)
			.values(HEADS.map((h) => ({ shopId, familyId: familyIds[h.family], serial: h.serial, customer: h.customer, mileageKm: h.mileageKm, receivedOn: '2026-01-02' })))
			.returning();
		// 4 heads × 3 measurements × 2 stages × 2 sides × 2 cylinders, spread over Jan–Mar 2026.
		const values: (typeof readings.$inferInsert)[] = [];
		let i = 0;
		for (const h of made)
			for (const measurement of MEASURED)
				for (const stage of ['as_received', 'final'] as const)
					for (const side of ['intake', 'exhaust'] as const)
						for (const cylinder of [1, 2]) {
							i++;
							values.push({
								shopId,
								headId: h.id,
								familyId: h.familyId,
								stage,
								cylinder,
								side,
								valve: 1,
								measurement,
								value: Math.round((0.03 + ((i * 37) % 50) / 1000) * 1000) / 1000,
								// Days 1–28 of Jan, Feb and Mar at 23:30 UTC, so a day boundary matters.
								measuredAt: new Date(Date.UTC(2026, i % 3, 1 + (i % 28), 23, 30)),
								measuredBy: MACHINISTS[i % 3],
								instrumentId: i % 4 === 0 ? gauge.id : null
							});
						}
		const inserted = await tx.insert(readings).values(values).returning();
		const byHead = new Map(made.map((h, k) => [h.id, HEADS[k]]));
		for (const r of inserted) {
			const h = byHead.get(r.headId)!;
			rows.push({ id: r.id, family: h.family, serial: h.serial, customer: h.customer, mileageKm: h.mileageKm, stage: r.stage, side: r.side, measurement: r.measurement, value: r.value, measuredAt: r.measuredAt, measuredBy: r.measuredBy });
		}
	});
	// Another shop's readings, with the same family code, customer and machinist: never exported here.
	await withShop(db, otherShopId, async (tx) => {
		const [h] = await tx.insert(heads).values({ shopId: otherShopId, familyId: other.family.id, serial: 'R-1', customer: 'North Garage', mileageKm: 80_000, receivedOn: '2026-01-02' }).returning();
		await tx.insert(readings).values(
			[1, 2, 3].map((cylinder) => ({ shopId: otherShopId, headId: h.id, familyId: other.family.id, stage: 'as_received' as const, cylinder, side: 'intake' as const, valve: 1, measurement: 'clearance' as const, value: 0.05, measuredAt: new Date('2026-02-10T10:00:00Z'), measuredBy: 'Ada Test' }))
		);
	});
});
afterAll(() => sql.end());

/** The definition of each filter, read plainly. */
function expected(q: ReadingsQuery): Fixture[] {
	const day = (d: Date) => d.toISOString().slice(0, 10);
	return rows.filter(
		(r) =>
			(!q.family || r.family === q.family) &&
			(!q.side || r.side === q.side) &&
			(!q.stage || r.stage === q.stage) &&
			(!q.measurement || r.measurement === q.measurement) &&
			(!q.from || day(r.measuredAt) >= q.from) &&
			(!q.to || day(r.measuredAt) <= q.to) &&
			(!q.machinist || r.measuredBy.toLowerCase() === q.machinist.toLowerCase()) &&
			(!q.customer || r.customer.toLowerCase() === q.customer.toLowerCase()) &&
			(q.mileageMin === undefined || (r.mileageKm !== null && r.mileageKm >= q.mileageMin)) &&
			(q.mileageMax === undefined || (r.mileageKm !== null && r.mileageKm <= q.mileageMax))
	);
}

const parse = (params: Record<string, string>) => readingsQuerySchema.parse(params);

async function exported(q: ReadingsQuery): Promise<Record<string, unknown>[]> {
	const sel = await withShop(db, shopId, (tx) => readingSelection(tx, shopId, q));
	const { text, params } = exportQuery(shopId, sel);
	const out: Record<string, unknown>[] = [];
	await sql.begin(async (t) => {
		await t`select set_config('lapmark.shop_id', ${shopId}, true)`;
		for await (const batch of t.unsafe<Record<string, unknown>[]>(text, params as never[]).cursor(7)) out.push(...batch);
	});
	return out;
}

const filterArb = fc.record(
	{
		family: fc.constantFrom('TEST-4', 'TEST-6', 'test-6'),
		side: fc.constantFrom('intake', 'exhaust'),
		stage: fc.constantFrom('as_received', 'final'),
		measurement: fc.constantFrom(...MEASURED),
		from: fc.constantFrom('2026-01-15', '2026-02-01', '2026-02-28'),
		to: fc.constantFrom('2026-02-14', '2026-03-10', '2026-03-31'),
		machinist: fc.constantFrom('ada TEST', 'Ben Test', 'nobody'),
		customer: fc.constantFrom('north garage', 'South Garage', 'Hill Transport'),
		mileageMin: fc.constantFrom('0', '100000', '200000'),
		mileageMax: fc.constantFrom('90000', '240000', '5000000')
	},
	{ requiredKeys: [] }
);

describe('the readings filters', () => {
	it('select exactly the readings their definitions select, page and export alike', async () => {
		await fc.assert(
			fc.asyncProperty(filterArb, async (params) => {
				const r = readingsQuerySchema.safeParse(params);
				fc.pre(r.success);
				const q = r.data!;
				const want = expected({ ...q, family: q.family?.toUpperCase() }).map((x) => x.id).sort((a, b) => a - b);
				const page = await withShop(db, shopId, async (tx) => readingsPageOf(tx, shopId, { ...q, page: 1, pageSize: 500 }, await readingSelection(tx, shopId, q)));
				expect(page.total).toBe(want.length);
				expect(page.items.map((x) => x.id).sort((a, b) => a - b)).toEqual(want);
				const all = await exported(q);
				expect(all.map((x) => x.id as number).sort((a, b) => a - b)).toEqual(want);
			}),
			{ numRuns: 60 }
		);
	});

	it('reads every reading of the shop when no filter is given, and none of another shop', async () => {
		const all = await exported(parse({}));
		expect(all).toHaveLength(rows.length);
		expect(new Set(all.map((r) => r.headSerial))).toEqual(new Set(HEADS.map((h) => h.serial)));
	});

	it('treats from and to as whole UTC days', async () => {
		// A reading at 23:30 UTC on 2026-01-10 belongs to that day, not the next.
		const q = parse({ from: '2026-01-10', to: '2026-01-10' });
		const got = await exported(q);
		expect(got.length).toBeGreaterThan(0);
		for (const r of got) expect(r.measuredAt).toMatch(/^2026-01-10T23:30:00\.000Z$/);
		expect(got).toHaveLength(expected(q).length);
	});
});

describe('an export row', () => {
	it('carries the head, family, unit and gauge, in time order', async () => {
		const got = await exported(parse({ measurement: 'vacuum_hold' }));
		expect(got.map((r) => r.measuredAt)).toEqual([...got.map((r) => r.measuredAt as string)].sort());
		const first = got[0];
		expect(Object.keys(first)).toEqual(['id', 'headId', 'headSerial', 'family', 'customer', 'stage', 'cylinder', 'side', 'valve', 'measurement', 'value', 'unit', 'measuredAt', 'measuredBy', 'instrument', 'mileageKm', 'batch']);
		expect(new Set(got.map((r) => r.unit))).toEqual(new Set([MEASUREMENT_INFO.vacuum_hold.unit]));
		expect(new Set(got.map((r) => r.instrument))).toEqual(new Set(['BG-7', null]));
		const fixture = rows.find((r) => r.id === first.id)!;
		expect(first).toMatchObject({ headSerial: fixture.serial, family: fixture.family, customer: fixture.customer, value: fixture.value, mileageKm: fixture.mileageKm, measuredAt: fixture.measuredAt.toISOString() });
	});
});

describe('a page of readings', () => {
	it('sorts in SQL, ties by reading id, and counts every page', async () => {
		const q = parse({ measurement: 'clearance', page: '2', pageSize: '5', sort: '-value' });
		const page = await withShop(db, shopId, async (tx) => readingsPageOf(tx, shopId, q, await readingSelection(tx, shopId, q)));
		const want = expected(q).sort((a, b) => b.value - a.value || b.id - a.id);
		expect(page.total).toBe(want.length);
		expect(page.pages).toBe(Math.ceil(want.length / 5));
		expect(page.items.map((x) => x.id)).toEqual(want.slice(5, 10).map((x) => x.id));
		expect(page.filters).toEqual({ measurement: 'clearance' });
	});

	it('sorts by mileage with unknown mileages last in both directions', async () => {
		for (const sort of ['mileage', '-mileage']) {
			const q = parse({ measurement: 'seat_width', stage: 'final', page: '1', pageSize: '500', sort });
			const page = await withShop(db, shopId, async (tx) => readingsPageOf(tx, shopId, q, await readingSelection(tx, shopId, q)));
			const miles = page.items.map((x) => x.mileageKm);
			expect(miles.at(-1)).toBeNull();
			const known = miles.filter((m): m is number => m !== null);
			expect(known).toEqual([...known].sort((a, b) => (sort === 'mileage' ? a - b : b - a)));
		}
	});

	it('refuses a family the shop does not have with a 404 naming its families', async () => {
		const err = await withShop(db, shopId, (tx) => readingSelection(tx, shopId, parse({ family: 'NOPE-1' }))).catch((e) => e);
		expect(err.status).toBe(404);
		expect(err.body.message).toMatch(/No engine family "NOPE-1".*TEST-4, TEST-6/);
	});
});

describe('the query schema', () => {
	it.each([
		[{ format: 'xml' }, /format must be csv or json/],
		[{ pageSize: '10' }, /add page=1/],
		[{ page: '1', format: 'csv' }, /a page is JSON/],
		[{ page: '0' }, /page starts at 1/],
		[{ page: '1', pageSize: '501' }, /pageSize must be at most 500/],
		[{ page: '1', sort: 'colour' }, /sort must be one of/],
		[{ measurement: 'width' }, /measurement must be one of/],
		[{ from: '2026-02-30' }, /not a calendar date/],
		[{ mileageMin: '10', mileageMax: '5' }, /mileageMin must not be above mileageMax/],
		[{ colour: 'red' }, /colour/]
	])('refuses %o', (params, message) => {
		const r = readingsQuerySchema.safeParse(params);
		expect(r.success).toBe(false);
		expect(r.error!.issues.map((i) => ('keys' in i ? `${i.message} ${(i.keys as string[]).join()}` : i.message)).join('; ')).toMatch(message);
	});
});
