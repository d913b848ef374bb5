// The readings of a planned head, streamed: a full seed writes them through COPY without
// holding a million objects in memory.
import { STAGE_MEASUREMENTS } from '../../inspection';
import type { Measurement, Stage } from '../../measurements';
import type { HeadPlan, Position, ShopContext } from './context';
import type { ReadingRow } from './types';

// The measurements of each stage in grid order: the order the readings are written in.
const AS_RECEIVED = STAGE_MEASUREMENTS.as_received;
const FINAL = STAGE_MEASUREMENTS.final;

export function* readingsOf(ctx: ShopContext, plan: HeadPlan): Generator<ReadingRow> {
	const { row } = plan;
	if (row.status === 'received') return;
	const inst = ctx.instrumentFor;
	// Plain object literals of one shape: cheaper to build than spreads, a million times over.
	const make = (p: Position, stage: Stage, measurement: Measurement, value: number, measuredAt: string, measuredBy: string): ReadingRow => ({
		shopId: row.shopId,
		headId: row.id,
		familyId: row.familyId,
		stage,
		cylinder: p.cylinder,
		side: p.side,
		valve: p.valve,
		measurement,
		value,
		measuredAt,
		measuredBy,
		instrumentId: inst.get(measurement) ?? null
	});
	for (const p of plan.positions) {
		const ar = p.ar;
		const asReceived = [ar.stem, ar.bore, ar.clr, ar.face, ar.seat, ar.width, ar.margin];
		for (let k = 0; k < AS_RECEIVED.length; k++) yield make(p, 'as_received', AS_RECEIVED[k], asReceived[k], p.arAt, plan.arBy);
		const f = p.fin;
		if (!f) continue;
		const fb = plan.finalBy;
		const final = [f.stem, f.bore, f.clr, f.seat, f.width, f.ra, f.vacFirst ?? f.vac, f.fluidFirst ?? f.fluid];
		for (let k = 0; k < FINAL.length; k++) yield make(p, 'final', FINAL[k], final[k], p.finAt, fb);
		if (f.vacFirst != null) {
			// The valve was lapped again and passed on the retest.
			yield make(p, 'final', 'vacuum_hold', f.vac, p.retestAt, fb);
			yield make(p, 'final', 'fluid_hold', f.fluid, p.retestAt, fb);
		}
	}
}
