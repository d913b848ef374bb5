// Everything known about one head, judged: its readings per stage and position with their flags
// (limits of their day, seal pass marks, gauge calibration, and optionally the fleet), the guide
// bore geometry, the suggested and recorded decisions, and what still stops its release.
// The head page, the grid, the decisions page, the report, the release and the e-mail all read it.
import { today } from '$lib/domain/days';
import { STAGES, type BoreDirection, type BoreHeight, type Measurement, type Side, type Stage } from '$lib/measurements';
import {
	boreGeometry,
	checkValue,
	DEFAULT_SEAL_MARKS,
	fleetKey,
	limitOn,
	positionsOf,
	posKey,
	SEAL_TESTS,
	STAGE_MEASUREMENTS,
	type BoreCellKey,
	type BoreGeometry,
	type CheckContext,
	type FleetStat,
	type Flag,
	type GaugeInfo,
	type LimitVersion,
	type Position,
	type SealPassMarks
} from '$lib/inspection';
import { inShop } from '../db';
import type { Conn } from '../db/scope';
import { notFound } from '../errors';
import { boreReadingsOf, currentReadings, decisionsOf, fleetStats, type DecisionRow } from '../queries/entry';
import { limitVersions } from '../queries/families';
import { comebackDetail, comebacksOfHead, headById, headRow, leakageOf, shopSettings } from '../queries/heads';
import { gaugesOf } from '../queries/instruments';
import { suggestDecision, type Bounds, type Suggestion } from './decisions';

export interface CellState {
	value: number;
	day: string;
	measuredAt: Date;
	measuredBy: string;
	instrumentId: string | null;
	fromImport: boolean;
	flags: Flag[];
}

export interface BoreCellState {
	value: number;
	day: string;
	measuredBy: string;
	instrumentId: string | null;
	flags: Flag[];
}

export interface PositionState {
	pos: Position;
	key: string;
	cells: Partial<Record<Measurement, CellState>>;
	bores: Partial<Record<BoreCellKey, BoreCellState>>;
	geometry: BoreGeometry;
	/** Every flag of the position's cells, in grid order. */
	flags: Flag[];
	/** Any flag that fails a check. */
	failing: boolean;
}

export interface ReleaseBlocker {
	key: string;
	pos: Position;
	reasons: string[];
}

export type HeadView = NonNullable<Awaited<ReturnType<typeof loadHeadView>>>;

export { today };

/** The judged view of one head of the shop, for the pages; a 404 refusal when there is none. */
export function headView(shopId: string, headId: string, opts: { fleet?: Stage } = {}): Promise<HeadView> {
	return inShop(shopId, (tx) => viewOrRefuse(tx, shopId, headId, opts));
}

/** loadHeadView inside the caller's transaction, refused (404) when the head is not there. */
export async function viewOrRefuse(conn: Conn, shopId: string, headId: string, opts: { fleet?: Stage } = {}): Promise<HeadView> {
	const view = await loadHeadView(conn, shopId, headId, opts);
	if (!view) throw notFound('No such head in this shop.');
	return view;
}

/** Null when the head is not this shop's (row-level security hides it, or it does not exist). */
/** `fleet`: also compare every value with the family's fleet at that stage (two percentile passes). */
export async function loadHeadView(conn: Conn, shopId: string, headId: string, opts: { fleet?: Stage } = {}) {
	const found = await headById(conn, shopId, headId);
	if (!found) return null;
	const { head, family } = found;
	const [readings, bores, versions, settings, gauges, decisionRows, leakage, returns, comebackOf] = await Promise.all([
		currentReadings(conn, shopId, headId),
		boreReadingsOf(conn, shopId, headId),
		limitVersions(conn, shopId, family.id),
		shopSettings(conn, shopId),
		gaugesOf(conn, shopId),
		decisionsOf(conn, shopId, headId),
		leakageOf(conn, shopId, headId),
		comebacksOfHead(conn, shopId, headId),
		head.comebackOf ? comebackDetail(conn, shopId, headId) : Promise.resolve(null)
	]);
	const original = head.comebackOf ? await headRow(conn, shopId, head.comebackOf) : null;
	const marks: SealPassMarks = {
		vacuumHoldPassPct: settings.vacuumHoldPassPct ?? DEFAULT_SEAL_MARKS.vacuumHoldPassPct,
		fluidHoldPassSeconds: settings.fluidHoldPassSeconds ?? DEFAULT_SEAL_MARKS.fluidHoldPassSeconds
	};
	const limits: LimitVersion[] = versions.map((v) => ({ measurement: v.measurement, side: v.side, stage: v.stage, min: v.min, max: v.max, effectiveFrom: v.effectiveFrom }));
	const fleet: Record<Stage, Partial<Record<string, FleetStat>>> = { as_received: {}, final: {} };
	if (opts.fleet) {
		for (const r of await fleetStats(conn, shopId, family.id, opts.fleet)) fleet[opts.fleet][fleetKey(r.side, r.measurement)] = { median: r.median, mad: r.mad, n: r.n };
	}
	const ctxFor = (stage: Stage): CheckContext => ({
		limits,
		marks,
		gauges,
		fleet: opts.fleet === stage ? fleet[stage] : undefined,
		fleetLabel: (side: Side) => `${family.code} ${side} ${stage === 'final' ? 'final' : 'as-received'}`
	});

	const positions = positionsOf(family);
	const stages = {} as Record<Stage, PositionState[]>;
	for (const stage of STAGES) {
		const ctx = ctxFor(stage);
		stages[stage] = positions.map((pos) => {
			const key = posKey(pos);
			const at = (r: { stage: Stage; cylinder: number; side: Side; valve: number }) =>
				r.stage === stage && r.cylinder === pos.cylinder && r.side === pos.side && r.valve === pos.valve;
			const cells: PositionState['cells'] = {};
			for (const r of readings.filter(at)) {
				cells[r.measurement] = {
					value: r.value,
					day: r.day,
					measuredAt: r.measuredAt,
					measuredBy: r.measuredBy,
					instrumentId: r.instrumentId,
					fromImport: r.batchId !== null,
					flags: checkValue(ctx, { value: r.value, measurement: r.measurement, side: pos.side, stage, day: r.day, instrumentId: r.instrumentId })
				};
			}
			const boreCells: PositionState['bores'] = {};
			for (const b of bores.filter(at)) {
				const k = `${b.direction as BoreDirection}:${b.height as BoreHeight}` as BoreCellKey;
				// A single bore reading is judged only for its gauge; the largest is judged as guide_bore.
				const gauge = b.instrumentId ? gauges.get(b.instrumentId) : undefined;
				const flags = gauge ? checkValue({ limits: [], marks, gauges }, { value: b.valueMm, measurement: 'guide_bore', side: pos.side, stage, day: b.day, instrumentId: b.instrumentId }) : [];
				boreCells[k] = { value: b.valueMm, day: b.day, measuredBy: b.measuredBy, instrumentId: b.instrumentId, flags };
			}
			const geometry = boreGeometry(Object.fromEntries(Object.entries(boreCells).map(([k, c]) => [k, c!.value])));
			const flags: Flag[] = [];
			for (const m of STAGE_MEASUREMENTS[stage]) flags.push(...(cells[m]?.flags ?? []));
			for (const c of Object.values(boreCells)) flags.push(...c!.flags);
			return { pos, key, cells, bores: boreCells, geometry, flags, failing: flags.some((f) => f.level === 'bad') };
		});
	}

	// Suggestions come from the as-received readings and the limits of their day; the rework
	// size is the final clearance limit in force today, when the work is done.
	const now = today();
	const decisions = new Map<string, DecisionRow>(decisionRows.map((d) => [posKey(d), d]));
	const suggestions = new Map<string, Suggestion>();
	for (const p of stages.as_received) {
		const values: Partial<Record<Measurement, number>> = {};
		const lims: Partial<Record<Measurement, Bounds>> = {};
		for (const [m, c] of Object.entries(p.cells) as [Measurement, CellState][]) {
			values[m] = c.value;
			const l = limitOn(limits, m, p.pos.side, 'as_received', c.day);
			if (l) lims[m] = { min: l.min, max: l.max };
		}
		const rework = limitOn(limits, 'clearance', p.pos.side, 'final', now);
		suggestions.set(
			p.key,
			suggestDecision({ side: p.pos.side, values, limits: lims, reworkClearanceMax: rework?.max ?? null, ovality: p.geometry.ovality, taper: p.geometry.taper })
		);
	}

	return {
		head,
		family,
		leakage,
		positions,
		stages,
		limits,
		limitRows: versions,
		marks,
		gauges,
		fleet,
		decisions,
		suggestions,
		returns,
		comeback: head.comebackOf ? { originalId: head.comebackOf, originalSerial: original?.serial ?? '', whatFailed: comebackOf?.whatFailed ?? '', positions: comebackOf?.positions ?? [] } : null,
		today: now
	};
}

/**
 * What stops a release, per position: no decision recorded, no bench seal test, a failing seal
 * test, or any final reading outside the limits of its day (or taken with a lapsed gauge).
 */
export function releaseBlockers(view: Pick<HeadView, 'stages' | 'decisions'>): ReleaseBlocker[] {
	const out: ReleaseBlocker[] = [];
	for (const p of view.stages.final) {
		const reasons: string[] = [];
		if (!view.decisions.has(p.key)) reasons.push('No decision recorded.');
		const seal = SEAL_TESTS.filter((m) => p.cells[m] !== undefined);
		if (seal.length === 0) reasons.push('No bench seal test (vacuum or fluid) recorded.');
		for (const f of p.flags) if (f.level === 'bad') reasons.push(f.text);
		if (reasons.length) out.push({ key: p.key, pos: p.pos, reasons });
	}
	return out;
}

export function gaugeList(gauges: Map<string, GaugeInfo & { kind: string; retired: boolean }>) {
	return [...gauges.values()].sort((a, b) => a.kind.localeCompare(b.kind) || a.name.localeCompare(b.name));
}
