// The data model refuses bad rows itself, each with a named constraint, whatever the app does.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { withShop } from '../../src/lib/server/db/scope';
import { cylinderLeakage, families, heads, instruments, limits, readings, shops, apiTokens } from '../../src/lib/server/db/schema';
import { makeShop, pgError, testDb } from '../helpers/db';

const { db, sql } = testDb();
let ctx: Awaited<ReturnType<typeof makeShop>>;
let headId: string;

beforeAll(async () => {
	ctx = await makeShop(db, 'schema');
	headId = await withShop(db, ctx.shop.id, async (tx) => {
		const [h] = await tx
			.insert(heads)
			.values({ shopId: ctx.shop.id, familyId: ctx.family.id, serial: 'S-1', receivedOn: '2026-01-05' })
			.returning();
		return h.id;
	});
});
afterAll(() => sql.end());

const reading = (over: Partial<typeof readings.$inferInsert> = {}) => ({
	shopId: ctx.shop.id,
	headId,
	familyId: ctx.family.id,
	stage: 'as_received' as const,
	cylinder: 1,
	side: 'intake' as const,
	valve: 1,
	measurement: 'clearance' as const,
	value: 0.05,
	measuredAt: new Date('2026-01-06T10:00:00Z'),
	measuredBy: 'Tester',
	...over
});

const insertReading = (over: Partial<typeof readings.$inferInsert>) =>
	withShop(db, ctx.shop.id, (tx) => tx.insert(readings).values(reading(over)));

describe('readings constraints', () => {
	it('accepts a good reading', async () => {
		await insertReading({ measuredAt: new Date('2026-01-06T09:00:00Z') });
	});

	it.each([
		['negative value', { value: -0.01 }, 'readings_value_finite'],
		['infinite value', { value: Number.POSITIVE_INFINITY }, 'readings_value_finite'],
		['clearance over 1 mm', { value: 1.5 }, 'readings_value_plausible'],
		['Ra over 50 µm', { measurement: 'roughness_ra' as const, value: 51 }, 'readings_value_plausible'],
		['hold over 100 %', { measurement: 'vacuum_hold' as const, value: 100.5 }, 'readings_value_plausible'],
		['cylinder 0', { cylinder: 0 }, 'readings_cylinder_range'],
		['valve 4', { valve: 4 }, 'readings_valve_range'],
		['blank machinist', { measuredBy: '  ' }, 'readings_measured_by_not_blank']
	])('refuses %s', async (_name, over, constraint) => {
		const err = await pgError(() => insertReading(over));
		expect(err.code).toBe('23514'); // check_violation
		expect(err.constraint).toBe(constraint);
	});

	it('refuses a reading whose family differs from its head', async () => {
		const other = await withShop(db, ctx.shop.id, async (tx) => {
			const [f] = await tx
				.insert(families)
				.values({ shopId: ctx.shop.id, code: 'OTHER-6', cylinders: 6, intakeValves: 1, exhaustValves: 1 })
				.returning();
			return f.id;
		});
		const err = await pgError(() => insertReading({ familyId: other }));
		expect(err.code).toBe('23503'); // foreign_key_violation
		expect(err.constraint).toBe('readings_head_fk');
	});

	it('refuses the same reading twice', async () => {
		await insertReading({ measuredAt: new Date('2026-01-07T10:00:00Z') });
		const err = await pgError(() => insertReading({ measuredAt: new Date('2026-01-07T10:00:00Z') }));
		expect(err.code).toBe('23505'); // unique_violation
		expect(err.constraint).toBe('readings_identity_key');
	});

	it('refuses an unknown measurement key', async () => {
		const err = await pgError(() => insertReading({ measurement: 'wobble' as never }));
		expect(err.code).toBe('22P02'); // invalid_text_representation (enum)
		expect(err.message).toMatch(/invalid input value for enum measurement/);
	});
});

describe('other tables', () => {
	const inShop = <T>(fn: (tx: Parameters<Parameters<typeof withShop>[2]>[0]) => Promise<T>) => withShop(db, ctx.shop.id, fn);

	it('limits need a bound, min ≤ max', async () => {
		const base = { shopId: ctx.shop.id, familyId: ctx.family.id, measurement: 'clearance' as const, side: 'intake' as const, stage: 'as_received' as const, effectiveFrom: '2026-01-01' };
		expect((await pgError(() => inShop((tx) => tx.insert(limits).values({ ...base })))).constraint).toBe('limits_has_bound');
		expect((await pgError(() => inShop((tx) => tx.insert(limits).values({ ...base, min: 0.2, max: 0.1 })))).constraint).toBe('limits_min_le_max');
		await inShop((tx) => tx.insert(limits).values({ ...base, max: 0.1 }));
		expect((await pgError(() => inShop((tx) => tx.insert(limits).values({ ...base, max: 0.12 })))).constraint).toBe('limits_version_key');
	});

	it('families have a sane layout and code', async () => {
		const base = { shopId: ctx.shop.id, cylinders: 4, intakeValves: 1, exhaustValves: 1 };
		expect((await pgError(() => inShop((tx) => tx.insert(families).values({ ...base, code: 'BAD CODE' })))).constraint).toBe('families_code_format');
		expect((await pgError(() => inShop((tx) => tx.insert(families).values({ ...base, code: 'ZERO', cylinders: 0 })))).constraint).toBe('families_cylinders_range');
		expect((await pgError(() => inShop((tx) => tx.insert(families).values({ ...base, code: 'V4', intakeValves: 4 })))).constraint).toBe('families_intake_valves_range');
		expect((await pgError(() => inShop((tx) => tx.insert(families).values({ ...base, code: 'TEST-4' })))).constraint).toBe('families_shop_code_key');
	});

	it('heads: released needs a release date on or after receipt; serial unique per shop', async () => {
		const base = { shopId: ctx.shop.id, familyId: ctx.family.id, receivedOn: '2026-02-01' };
		expect((await pgError(() => inShop((tx) => tx.insert(heads).values({ ...base, serial: 'S-2', status: 'released' })))).constraint).toBe('heads_released_status');
		expect((await pgError(() => inShop((tx) => tx.insert(heads).values({ ...base, serial: 'S-3', status: 'released', releasedOn: '2026-01-01' })))).constraint).toBe('heads_released_after_received');
		expect((await pgError(() => inShop((tx) => tx.insert(heads).values({ ...base, serial: 'S-1' })))).constraint).toBe('heads_shop_serial_key');
		expect((await pgError(() => inShop((tx) => tx.insert(heads).values({ ...base, serial: 'S-4', mileageKm: -5 })))).constraint).toBe('heads_mileage_range');
	});

	it('cylinder leakage is a percentage, held pressure at most the input', async () => {
		const base = { shopId: ctx.shop.id, headId, cylinder: 1 };
		expect((await pgError(() => inShop((tx) => tx.insert(cylinderLeakage).values({ ...base, leakagePct: 120 })))).constraint).toBe('cylinder_leakage_pct_range');
		expect((await pgError(() => inShop((tx) => tx.insert(cylinderLeakage).values({ ...base, leakagePct: 10, pressureInKpa: 600, pressureHeldKpa: 700 })))).constraint).toBe('cylinder_leakage_pressures');
	});

	it('instruments need a calibration interval', async () => {
		const base = { shopId: ctx.shop.id, name: 'Mic', kind: 'micrometer', serial: 'M-1', calibratedOn: '2026-01-01' };
		expect((await pgError(() => inShop((tx) => tx.insert(instruments).values({ ...base, intervalDays: 0 })))).constraint).toBe('instruments_interval_range');
	});

	it('api tokens store a SHA-256 hash only', async () => {
		const err = await pgError(() =>
			inShop((tx) => tx.insert(apiTokens).values({ shopId: ctx.shop.id, userId: 'nobody', name: 'x', prefix: 'lmk_', tokenHash: 'lmk_plaintext', role: 'engineer' }))
		);
		expect(['api_tokens_hash_format', 'api_tokens_user_id_user_id_fk']).toContain(err.constraint);
	});

	it('row-level security refuses a row for another shop', async () => {
		const err = await pgError(() => inShop((tx) => tx.insert(shops).values({ name: 'Sneaky', slug: 'sneaky-shop' })));
		expect(err.code).toBe('42501'); // insufficient_privilege: new row violates row-level security policy
	});
});
