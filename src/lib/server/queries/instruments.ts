import { and, asc, desc, eq, sql } from 'drizzle-orm';
import type { GaugeInfo } from '$lib/inspection';
import type { Conn } from '../db/scope';
import { instrumentCalibrations, instruments, users } from '../db/schema';

/** The gauge kinds a shop registers (plain words; "other" for anything else). */
export const INSTRUMENT_KINDS = [
	'micrometer',
	'bore_gauge',
	'small_hole_gauge',
	'dial_indicator',
	'caliper',
	'roughness_tester',
	'vacuum_tester',
	'leakdown_tester',
	'other'
] as const;
export type InstrumentKind = (typeof INSTRUMENT_KINDS)[number];

export interface InstrumentRow {
	id: string;
	name: string;
	kind: string;
	serial: string;
	resolutionMm: number | null;
	calibratedOn: string;
	intervalDays: number;
	retired: boolean;
	/** calibrated_on + interval_days: the last day the calibration holds. */
	dueOn: string;
	/** Days from today to dueOn; negative when overdue. */
	daysLeft: number;
}

const DUE = sql<string>`(${instruments.calibratedOn} + ${instruments.intervalDays})::text`;
const DAYS_LEFT = sql<number>`((${instruments.calibratedOn} + ${instruments.intervalDays}) - current_date)::int`;

const COLUMNS = {
	id: instruments.id,
	name: instruments.name,
	kind: instruments.kind,
	serial: instruments.serial,
	resolutionMm: instruments.resolutionMm,
	calibratedOn: instruments.calibratedOn,
	intervalDays: instruments.intervalDays,
	retired: instruments.retired,
	dueOn: DUE,
	daysLeft: DAYS_LEFT
};

export async function listInstruments(conn: Conn, shopId: string): Promise<InstrumentRow[]> {
	return conn.select(COLUMNS).from(instruments).where(eq(instruments.shopId, shopId)).orderBy(asc(instruments.retired), asc(instruments.kind), asc(instruments.name));
}

/**
 * Gauges in use whose calibration runs out within `days` days from today, or already has
 * (negative daysLeft), soonest first. For the Overview's list of gauges to send for calibration.
 */
export async function instrumentsDueWithin(conn: Conn, shopId: string, days: number): Promise<InstrumentRow[]> {
	if (!Number.isInteger(days) || days < 0 || days > 3650) throw new RangeError('days must be a whole number of days, 0 to 3650');
	return conn
		.select(COLUMNS)
		.from(instruments)
		.where(and(eq(instruments.shopId, shopId), eq(instruments.retired, false), sql`${instruments.calibratedOn} + ${instruments.intervalDays} <= current_date + ${days}::int`))
		.orderBy(sql`${instruments.calibratedOn} + ${instruments.intervalDays}`, asc(instruments.name));
}

export async function instrumentById(conn: Conn, shopId: string, id: string) {
	const [row] = await conn.select().from(instruments).where(and(eq(instruments.shopId, shopId), eq(instruments.id, id))).limit(1);
	return row ?? null;
}

export async function serialInUse(conn: Conn, shopId: string, serial: string) {
	const [row] = await conn.select({ id: instruments.id }).from(instruments).where(and(eq(instruments.shopId, shopId), eq(instruments.serial, serial))).limit(1);
	return Boolean(row);
}

export async function insertInstrument(conn: Conn, v: typeof instruments.$inferInsert, recordedBy: string) {
	const [row] = await conn.insert(instruments).values(v).returning();
	await conn.insert(instrumentCalibrations).values({
		shopId: row.shopId,
		instrumentId: row.id,
		calibratedOn: row.calibratedOn,
		intervalDays: row.intervalDays,
		note: 'Calibration on record when the gauge was registered',
		recordedBy
	});
	return row;
}

/** Records a calibration; the instrument row keeps the latest one. */
export async function recordCalibration(conn: Conn, v: { shopId: string; instrumentId: string; calibratedOn: string; intervalDays: number; note: string; recordedBy: string }) {
	const before = await instrumentById(conn, v.shopId, v.instrumentId);
	if (!before) return null;
	// The record the gauge had before the history began (demo and imported gauges) joins it.
	await conn
		.insert(instrumentCalibrations)
		.values({ shopId: v.shopId, instrumentId: v.instrumentId, calibratedOn: before.calibratedOn, intervalDays: before.intervalDays, note: 'Earlier calibration on record' })
		.onConflictDoNothing();
	await conn
		.insert(instrumentCalibrations)
		.values(v)
		.onConflictDoUpdate({
			target: [instrumentCalibrations.instrumentId, instrumentCalibrations.calibratedOn],
			set: { intervalDays: v.intervalDays, note: v.note, recordedBy: v.recordedBy }
		});
	if (v.calibratedOn >= before.calibratedOn) {
		await conn
			.update(instruments)
			.set({ calibratedOn: v.calibratedOn, intervalDays: v.intervalDays })
			.where(and(eq(instruments.shopId, v.shopId), eq(instruments.id, v.instrumentId)));
	}
	return before;
}

export async function setRetired(conn: Conn, shopId: string, id: string, retired: boolean) {
	const [row] = await conn.update(instruments).set({ retired }).where(and(eq(instruments.shopId, shopId), eq(instruments.id, id))).returning();
	return row ?? null;
}

export async function calibrationHistory(conn: Conn, shopId: string) {
	return conn
		.select({
			instrumentId: instrumentCalibrations.instrumentId,
			calibratedOn: instrumentCalibrations.calibratedOn,
			intervalDays: instrumentCalibrations.intervalDays,
			note: instrumentCalibrations.note,
			recordedBy: users.name
		})
		.from(instrumentCalibrations)
		.leftJoin(users, eq(users.id, instrumentCalibrations.recordedBy))
		.where(eq(instrumentCalibrations.shopId, shopId))
		.orderBy(asc(instrumentCalibrations.instrumentId), desc(instrumentCalibrations.calibratedOn));
}

/** Every gauge of the shop with all its calibrations, for judging readings by the calibration of their day. */
export async function gaugesOf(conn: Conn, shopId: string): Promise<Map<string, GaugeInfo & { kind: string; retired: boolean }>> {
	const list = await conn.select().from(instruments).where(eq(instruments.shopId, shopId));
	const history = await conn
		.select({ instrumentId: instrumentCalibrations.instrumentId, calibratedOn: instrumentCalibrations.calibratedOn, intervalDays: instrumentCalibrations.intervalDays })
		.from(instrumentCalibrations)
		.where(eq(instrumentCalibrations.shopId, shopId));
	const out = new Map<string, GaugeInfo & { kind: string; retired: boolean }>();
	for (const i of list) {
		out.set(i.id, { id: i.id, name: i.name, serial: i.serial, kind: i.kind, retired: i.retired, calibrations: [{ calibratedOn: i.calibratedOn, intervalDays: i.intervalDays }] });
	}
	for (const h of history) {
		const g = out.get(h.instrumentId);
		if (g && !g.calibrations.some((c) => c.calibratedOn === h.calibratedOn)) g.calibrations.push({ calibratedOn: h.calibratedOn, intervalDays: h.intervalDays });
	}
	return out;
}
