/**
 * Valve positions, the inspection grid's columns, guide bore geometry and the checks a value
 * gets as soon as it is typed. Shared by the browser (instant flags) and the server (saved
 * state, release checks, report), so both judge a value the same way.
 */
import {
	BORE_DIRECTIONS,
	BORE_HEIGHTS,
	MEASUREMENT_INFO,
	UNIT_LABEL,
	type BoreDirection,
	type BoreHeight,
	type Measurement,
	type Side,
	type Stage,
	type Unit
} from './measurements';
import { addDays } from './domain/days';
import { MODIFIED_Z_FACTOR, MODIFIED_Z_THRESHOLD, modifiedZ } from './domain/robust';

// ---------------------------------------------------------------------------------------------
// Positions

export interface Position {
	cylinder: number;
	side: Side;
	valve: number;
}

export interface FamilyLayout {
	cylinders: number;
	intakeValves: number;
	exhaustValves: number;
}

/** Every valve position of a family: by cylinder, intake valves first, then exhaust. */
export function positionsOf(f: FamilyLayout): Position[] {
	const out: Position[] = [];
	for (let c = 1; c <= f.cylinders; c++) {
		for (let v = 1; v <= f.intakeValves; v++) out.push({ cylinder: c, side: 'intake', valve: v });
		for (let v = 1; v <= f.exhaustValves; v++) out.push({ cylinder: c, side: 'exhaust', valve: v });
	}
	return out;
}

export function posKey(p: Position): string {
	return `${p.cylinder}-${p.side}-${p.valve}`;
}

export function parsePosKey(key: string): Position | null {
	const m = /^(\d{1,2})-(intake|exhaust)-([1-3])$/.exec(key);
	if (!m) return null;
	return { cylinder: Number(m[1]), side: m[2] as Side, valve: Number(m[3]) };
}

export function hasPosition(f: FamilyLayout, p: Position): boolean {
	const n = p.side === 'intake' ? f.intakeValves : f.exhaustValves;
	return Number.isInteger(p.cylinder) && p.cylinder >= 1 && p.cylinder <= f.cylinders && p.valve >= 1 && p.valve <= n;
}

/** "Cyl 3 exhaust 2" (the valve number only when the cylinder has more than one of that side). */
export function posLabel(p: Position, f: FamilyLayout): string {
	const many = (p.side === 'intake' ? f.intakeValves : f.exhaustValves) > 1;
	return `Cyl ${p.cylinder} ${p.side}${many ? ` ${p.valve}` : ''}`;
}

// ---------------------------------------------------------------------------------------------
// The grid's columns

export const STAGE_SLUGS: Record<Stage, string> = { as_received: 'as-received', final: 'final' };
export const STAGE_LABEL: Record<Stage, string> = { as_received: 'As-received inspection', final: 'Final inspection' };
export function stageFromSlug(slug: string): Stage | null {
	return slug === 'as-received' ? 'as_received' : slug === 'final' ? 'final' : null;
}

/** The measurements each stage records per position, in grid order. */
export const STAGE_MEASUREMENTS: Record<Stage, Measurement[]> = {
	as_received: ['stem_diameter', 'guide_bore', 'clearance', 'face_runout', 'seat_runout', 'seat_width', 'margin'],
	final: ['stem_diameter', 'guide_bore', 'clearance', 'seat_runout', 'seat_width', 'roughness_ra', 'vacuum_hold', 'fluid_hold']
};

/** Computed from the bore cells and the stem, never typed. */
export const DERIVED: readonly Measurement[] = ['guide_bore', 'clearance'];
export const SEAL_TESTS: readonly Measurement[] = ['vacuum_hold', 'fluid_hold'];

export type BoreCellKey = `${BoreDirection}:${BoreHeight}`;
export type EntryField = Measurement | `bore:${BoreCellKey}`;

export const BORE_CELLS: BoreCellKey[] = BORE_HEIGHTS.flatMap((h) => BORE_DIRECTIONS.map((d) => `${d}:${h}` as BoreCellKey));

/** The heights shown for 1, 2 or 3 gauged heights. */
export const HEIGHTS_FOR: Record<1 | 2 | 3, BoreHeight[]> = { 1: ['middle'], 2: ['top', 'bottom'], 3: ['top', 'middle', 'bottom'] };

/** The fields a person types for a stage: the typed measurements, with the bore cells in place of guide bore. */
export function typedFields(stage: Stage): EntryField[] {
	const out: EntryField[] = [];
	for (const m of STAGE_MEASUREMENTS[stage]) {
		if (m === 'guide_bore') out.push(...BORE_CELLS.map((c) => `bore:${c}` as EntryField));
		else if (!DERIVED.includes(m)) out.push(m);
	}
	return out;
}

export function parseField(text: string): EntryField | null {
	if (text.startsWith('bore:')) {
		const [d, h] = text.slice(5).split(':');
		return (BORE_DIRECTIONS as readonly string[]).includes(d) && (BORE_HEIGHTS as readonly string[]).includes(h) ? (text as EntryField) : null;
	}
	return text in MEASUREMENT_INFO ? (text as Measurement) : null;
}

export function boreCellOf(field: EntryField): { direction: BoreDirection; height: BoreHeight } | null {
	if (!field.startsWith('bore:')) return null;
	const [direction, height] = field.slice(5).split(':') as [BoreDirection, BoreHeight];
	return { direction, height };
}

// ---------------------------------------------------------------------------------------------
// Guide bore geometry

/** Rounds a difference of two readings to the nanometre: removes binary noise (7.062 − 7 is
 * 0.06199999999999983 in floating point), far below any gauge's resolution. */
export function roundNm(x: number): number {
	return Math.round(x * 1e9) / 1e9;
}

export interface BoreGeometry {
	/** The largest bore reading: the one clearance is worked from. */
	largest: number | null;
	/** Largest difference between the two directions at one height (needs both at a height). */
	ovality: number | null;
	ovalityAt: BoreHeight | null;
	/** Largest − smallest across heights in one direction, the larger of the two directions
	 * (needs two heights in a direction): a bell-mouthed guide is larger at its ends. */
	taper: number | null;
	taperDirection: BoreDirection | null;
}

export function boreGeometry(cells: Partial<Record<BoreCellKey, number>>): BoreGeometry {
	const values = Object.values(cells).filter((v): v is number => typeof v === 'number' && Number.isFinite(v));
	const out: BoreGeometry = { largest: values.length ? Math.max(...values) : null, ovality: null, ovalityAt: null, taper: null, taperDirection: null };
	for (const h of BORE_HEIGHTS) {
		const a = cells[`along:${h}`];
		const b = cells[`across:${h}`];
		if (a === undefined || b === undefined) continue;
		const d = roundNm(Math.abs(a - b));
		if (out.ovality === null || d > out.ovality) {
			out.ovality = d;
			out.ovalityAt = h;
		}
	}
	for (const dir of BORE_DIRECTIONS) {
		const vs = BORE_HEIGHTS.map((h) => cells[`${dir}:${h}`]).filter((v): v is number => v !== undefined);
		if (vs.length < 2) continue;
		const t = roundNm(Math.max(...vs) - Math.min(...vs));
		if (out.taper === null || t > out.taper) {
			out.taper = t;
			out.taperDirection = dir;
		}
	}
	return out;
}

/** Stem-to-guide clearance: the largest bore reading minus the stem diameter. */
export function clearanceOf(largestBore: number | null, stem: number | null | undefined): number | null {
	if (largestBore === null || stem === null || stem === undefined) return null;
	return roundNm(largestBore - stem);
}

// ---------------------------------------------------------------------------------------------
// Dates (YYYY-MM-DD, UTC, as PostgreSQL's date type): $lib/domain/days

export { addDays, daysBetween } from './domain/days';

// ---------------------------------------------------------------------------------------------
// Checks

export interface LimitVersion {
	measurement: Measurement;
	side: Side;
	stage: Stage;
	min: number | null;
	max: number | null;
	effectiveFrom: string;
}

/** The limit version in effect on `day`: the latest that took effect on or before it. */
export function limitOn(versions: readonly LimitVersion[], m: Measurement, side: Side, stage: Stage, day: string): LimitVersion | null {
	let hit: LimitVersion | null = null;
	for (const v of versions) {
		if (v.measurement !== m || v.side !== side || v.stage !== stage || v.effectiveFrom > day) continue;
		if (!hit || v.effectiveFrom > hit.effectiveFrom) hit = v;
	}
	return hit;
}

export type FlagKind = 'limit' | 'fleet' | 'gauge' | 'seal';
export interface Flag {
	kind: FlagKind;
	/** 'bad' fails a check; 'note' is worth a look but fails nothing. */
	level: 'bad' | 'note';
	text: string;
}

/** A value in a unit, with the unit's sensible number of decimals. */
export function formatIn(canonical: number, m: Measurement, unit?: Unit): string {
	const info = MEASUREMENT_INFO[m];
	const u = unit ?? info.units[0];
	if (u === info.units[0]) return `${canonical.toFixed(info.decimals)} ${UNIT_LABEL[u]}`;
	const factor = u === 'in' ? 25.4 : u === 'uin' ? 0.0254 : 1;
	const v = canonical / factor;
	const decimals = u === 'in' ? 5 : u === 'uin' ? 1 : info.decimals;
	return `${Number(v.toFixed(decimals))} ${UNIT_LABEL[u]}`;
}

/** Outside the limit in effect (limits are inclusive). */
export function limitFlag(value: number, m: Measurement, limit: LimitVersion | null): Flag | null {
	if (!limit) return null;
	const label = MEASUREMENT_INFO[m].label;
	const since = `limits from ${limit.effectiveFrom}`;
	if (limit.min !== null && value < limit.min) {
		return { kind: 'limit', level: 'bad', text: `${label} ${formatIn(value, m)} is below the minimum ${formatIn(limit.min, m)} (${since}).` };
	}
	if (limit.max !== null && value > limit.max) {
		return { kind: 'limit', level: 'bad', text: `${label} ${formatIn(value, m)} is above the maximum ${formatIn(limit.max, m)} (${since}).` };
	}
	return null;
}

export interface FleetStat {
	median: number;
	/** Raw median absolute deviation (not scaled). */
	mad: number;
	n: number;
}

/** Fewer readings than this and the fleet says nothing about a value. */
export const FLEET_MIN = 30;
/** Iglewicz & Hoaglin (1993): |0.6745·(x − median)/MAD| > 3.5 marks a potential outlier: the
 * modified z-score of $lib/domain/robust, which the server's statistics use too. */
export const ROBUST_Z_FACTOR = MODIFIED_Z_FACTOR;
export const ROBUST_Z_LIMIT = MODIFIED_Z_THRESHOLD;

export function robustZ(value: number, fleet: FleetStat | null | undefined): number | null {
	if (!fleet || fleet.n < FLEET_MIN) return null;
	return modifiedZ(value, fleet.median, fleet.mad);
}

export function fleetFlag(value: number, m: Measurement, fleet: FleetStat | null | undefined, what: string): Flag | null {
	const z = robustZ(value, fleet);
	if (z === null || Math.abs(z) <= ROBUST_Z_LIMIT || !fleet) return null;
	return {
		kind: 'fleet',
		level: 'note',
		text: `Unusual for the fleet: robust z ${z.toFixed(1)} (median ${formatIn(fleet.median, m)}, MAD ${formatIn(fleet.mad, m)} over ${fleet.n} ${what} readings).`
	};
}

export interface CalibrationRecord {
	calibratedOn: string;
	intervalDays: number;
}
export interface GaugeInfo {
	id: string;
	name: string;
	serial: string;
	/** Every calibration on record, the current one included. */
	calibrations: CalibrationRecord[];
}

/** The day a gauge's calibration in effect on `day` ran out, or null when it had not. A reading
 * from before the first calibration on record cannot be judged and is not flagged. */
export function calibrationLapsedOn(calibrations: readonly CalibrationRecord[], day: string): string | null {
	let current: CalibrationRecord | null = null;
	for (const c of calibrations) if (c.calibratedOn <= day && (!current || c.calibratedOn > current.calibratedOn)) current = c;
	if (!current) return null;
	const due = addDays(current.calibratedOn, current.intervalDays);
	return day > due ? due : null;
}

export function gaugeFlag(gauge: GaugeInfo | null | undefined, day: string): Flag | null {
	if (!gauge) return null;
	const due = calibrationLapsedOn(gauge.calibrations, day);
	if (!due) return null;
	return { kind: 'gauge', level: 'bad', text: `Taken with ${gauge.name} (${gauge.serial}), whose calibration ran out on ${due}.` };
}

export interface SealPassMarks {
	/** Share of the applied vacuum a closed valve must hold (common practice: 90 %). */
	vacuumHoldPassPct: number;
	/** Seconds without a drip that pass the fluid test (common practice: 120 s). */
	fluidHoldPassSeconds: number;
}
export const DEFAULT_SEAL_MARKS: SealPassMarks = { vacuumHoldPassPct: 90, fluidHoldPassSeconds: 120 };

export function sealFlag(m: Measurement, value: number, marks: SealPassMarks): Flag | null {
	if (m === 'vacuum_hold' && value < marks.vacuumHoldPassPct) {
		return { kind: 'seal', level: 'bad', text: `Vacuum hold ${value.toFixed(1)} % is under the pass mark of ${marks.vacuumHoldPassPct} %: the valve leaks.` };
	}
	if (m === 'fluid_hold' && value < marks.fluidHoldPassSeconds) {
		return { kind: 'seal', level: 'bad', text: `First drip after ${Math.round(value)} s; a pass needs no drip in ${marks.fluidHoldPassSeconds} s.` };
	}
	return null;
}

export interface CheckContext {
	limits: readonly LimitVersion[];
	marks: SealPassMarks;
	fleet?: Partial<Record<string, FleetStat>>;
	/** e.g. "ALDER-4 exhaust as-received", for the fleet reason. */
	fleetLabel?: (side: Side) => string;
	gauges?: ReadonlyMap<string, GaugeInfo>;
}

export function fleetKey(side: Side, m: Measurement): string {
	return `${side}|${m}`;
}

/** Every flag a value earns: the limit of its day, the seal pass marks, the gauge's calibration, the fleet. */
export function checkValue(
	ctx: CheckContext,
	v: { value: number; measurement: Measurement; side: Side; stage: Stage; day: string; instrumentId?: string | null }
): Flag[] {
	const flags: Flag[] = [];
	const lf = limitFlag(v.value, v.measurement, limitOn(ctx.limits, v.measurement, v.side, v.stage, v.day));
	const sf = v.stage === 'final' ? sealFlag(v.measurement, v.value, ctx.marks) : null;
	// A seal test under the shop's pass mark says it all; a family limit adds only when it is stricter.
	if (sf) flags.push(sf);
	if (lf && !(sf && lf.text.includes('below the minimum'))) flags.push(lf);
	if (v.instrumentId && ctx.gauges) {
		const gf = gaugeFlag(ctx.gauges.get(v.instrumentId), v.day);
		if (gf) flags.push(gf);
	}
	if (ctx.fleet) {
		const ff = fleetFlag(v.value, v.measurement, ctx.fleet[fleetKey(v.side, v.measurement)], ctx.fleetLabel?.(v.side) ?? 'fleet');
		if (ff) flags.push(ff);
	}
	return flags;
}
