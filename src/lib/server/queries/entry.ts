// Readings of one head as the inspection grid shows and writes them.
import { and, asc, desc, eq, sql, type Column } from 'drizzle-orm';
import type { BoreDirection, BoreHeight, Measurement, Side, Stage } from '$lib/measurements';
import type { Conn } from '../db/scope';
import { boreReadings, decisions, readings } from '../db/schema';
import { currentReadingsSql } from './heads';

export interface CurrentReading {
	id: number;
	stage: Stage;
	cylinder: number;
	side: Side;
	valve: number;
	measurement: Measurement;
	value: number;
	measuredAt: Date;
	/** The day the reading was taken (the database's date of measured_at), for the limits of its day. */
	day: string;
	measuredBy: string;
	instrumentId: string | null;
	batchId: string | null;
}

export async function currentReadings(conn: Conn, shopId: string, headId: string): Promise<CurrentReading[]> {
	const rows = await conn.execute<{
		id: string | number;
		stage: Stage;
		cylinder: number;
		side: Side;
		valve: number;
		measurement: Measurement;
		value: number;
		measured_at: string | Date;
		day: string;
		measured_by: string;
		instrument_id: string | null;
		batch_id: string | null;
	}>(sql`
		select c.id, c.stage, c.cylinder, c.side, c.valve, c.measurement, c.value, c.measured_at,
			c.measured_at::date::text as day, c.measured_by, c.instrument_id, c.batch_id
		from (${currentReadingsSql(shopId, [headId])}) c
		order by c.stage, c.cylinder, c.side, c.valve, c.measurement`);
	return rows.map((r) => ({
		id: Number(r.id),
		stage: r.stage,
		cylinder: r.cylinder,
		side: r.side,
		valve: r.valve,
		measurement: r.measurement,
		value: r.value,
		measuredAt: new Date(r.measured_at),
		day: r.day,
		measuredBy: r.measured_by,
		instrumentId: r.instrument_id,
		batchId: r.batch_id
	}));
}

export async function boreReadingsOf(conn: Conn, shopId: string, headId: string) {
	return conn
		.select({
			id: boreReadings.id,
			stage: boreReadings.stage,
			cylinder: boreReadings.cylinder,
			side: boreReadings.side,
			valve: boreReadings.valve,
			direction: boreReadings.direction,
			height: boreReadings.height,
			valueMm: boreReadings.valueMm,
			measuredAt: boreReadings.measuredAt,
			day: sql<string>`${boreReadings.measuredAt}::date::text`,
			measuredBy: boreReadings.measuredBy,
			instrumentId: boreReadings.instrumentId
		})
		.from(boreReadings)
		.where(and(eq(boreReadings.shopId, shopId), eq(boreReadings.headId, headId)))
		.orderBy(asc(boreReadings.stage), asc(boreReadings.cylinder), asc(boreReadings.side), asc(boreReadings.valve));
}
export type BoreRow = Awaited<ReturnType<typeof boreReadingsOf>>[number];

interface Cell {
	shopId: string;
	headId: string;
	stage: Stage;
	cylinder: number;
	side: Side;
	valve: number;
}

/** The columns that place a value at one valve position of one head and stage. */
type PositionColumns = { shopId: Column; headId: Column; stage: Column; cylinder: Column; side: Column; valve: Column };
const atPosition = (t: PositionColumns, c: Cell) =>
	[eq(t.shopId, c.shopId), eq(t.headId, c.headId), eq(t.stage, c.stage), eq(t.cylinder, c.cylinder), eq(t.side, c.side), eq(t.valve, c.valve)];

const cellWhere = (c: Cell, m: Measurement) => and(...atPosition(readings, c), eq(readings.measurement, m));

/** Every reading of one cell, newest first. */
export async function cellReadings(conn: Conn, c: Cell, m: Measurement) {
	return conn.select().from(readings).where(cellWhere(c, m)).orderBy(desc(readings.measuredAt), desc(readings.id));
}

export async function insertReading(conn: Conn, v: typeof readings.$inferInsert) {
	const [row] = await conn.insert(readings).values(v).returning();
	return row;
}

export async function updateReading(conn: Conn, shopId: string, id: number, v: { value: number; measuredAt: Date; measuredBy: string; instrumentId: string | null }) {
	await conn
		.update(readings)
		.set(v)
		.where(and(eq(readings.shopId, shopId), eq(readings.id, id)));
}

export async function deleteCellReadings(conn: Conn, c: Cell, m: Measurement) {
	return conn.delete(readings).where(cellWhere(c, m)).returning();
}

const boreWhere = (c: Cell, direction?: BoreDirection, height?: BoreHeight) =>
	and(
		...atPosition(boreReadings, c),
		...(direction ? [eq(boreReadings.direction, direction)] : []),
		...(height ? [eq(boreReadings.height, height)] : [])
	);

export async function boreCells(conn: Conn, c: Cell) {
	return conn.select().from(boreReadings).where(boreWhere(c));
}

export async function upsertBore(
	conn: Conn,
	c: Cell & { direction: BoreDirection; height: BoreHeight; valueMm: number; measuredAt: Date; measuredBy: string; instrumentId: string | null; enteredBy: string }
) {
	const [row] = await conn
		.insert(boreReadings)
		.values(c)
		.onConflictDoUpdate({
			target: [boreReadings.headId, boreReadings.stage, boreReadings.cylinder, boreReadings.side, boreReadings.valve, boreReadings.direction, boreReadings.height],
			set: { valueMm: c.valueMm, measuredAt: c.measuredAt, measuredBy: c.measuredBy, instrumentId: c.instrumentId, enteredBy: c.enteredBy }
		})
		.returning();
	return row;
}

export async function deleteBore(conn: Conn, c: Cell, direction: BoreDirection, height: BoreHeight) {
	return conn.delete(boreReadings).where(boreWhere(c, direction, height)).returning();
}

/** Median and raw MAD of every reading of a family × stage, per side × measurement: the fleet a
 * value is compared with. Two passes of percentile_cont (type 7, as everywhere in Lapmark). */
export async function fleetStats(conn: Conn, shopId: string, familyId: string, stage: Stage) {
	return conn.execute<{ side: Side; measurement: Measurement; median: number; mad: number; n: number }>(sql`
		with med as (
			select side, measurement, percentile_cont(0.5) within group (order by value) as median, count(*)::int as n
			from readings where shop_id = ${shopId} and family_id = ${familyId} and stage = ${stage}
			group by side, measurement
		)
		select r.side, r.measurement, m.median, m.n,
			percentile_cont(0.5) within group (order by abs(r.value - m.median)) as mad
		from readings r join med m on m.side = r.side and m.measurement = r.measurement
		where r.shop_id = ${shopId} and r.family_id = ${familyId} and r.stage = ${stage}
		group by r.side, r.measurement, m.median, m.n`);
}

// ---------------------------------------------------------------------------------------------
// Decisions

export async function decisionsOf(conn: Conn, shopId: string, headId: string) {
	return conn
		.select()
		.from(decisions)
		.where(and(eq(decisions.shopId, shopId), eq(decisions.headId, headId)))
		.orderBy(asc(decisions.cylinder), asc(decisions.side), asc(decisions.valve));
}
export type DecisionRow = Awaited<ReturnType<typeof decisionsOf>>[number];

export async function upsertDecision(conn: Conn, v: typeof decisions.$inferInsert) {
	const [row] = await conn
		.insert(decisions)
		.values(v)
		.onConflictDoUpdate({
			target: [decisions.headId, decisions.cylinder, decisions.side, decisions.valve],
			set: { suggested: v.suggested, rule: v.rule, kind: v.kind, note: v.note, decidedBy: v.decidedBy, decidedAt: sql`now()` }
		})
		.returning();
	return row;
}
