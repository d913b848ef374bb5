// The statistics engine: selections resolved against the shop, aggregates from queries/stats.ts,
// finished with the pure functions of stats/. Each function runs inside withShop's transaction
// and returns the JSON the /api/v1 statistics routes send (shapes in $lib/api/stats.ts).
import { error } from '@sveltejs/kit';
import type {
	CapabilityResponse,
	CheckResponse,
	ComebacksResponse,
	CompareResponse,
	ControlResponse,
	DescribeResponse,
	DistributionResponse,
	DistributionSummary,
	EchoFilters,
	FamilyLabel,
	LimitInfo,
	OutliersResponse,
	RateCell,
	RatesResponse,
	SideDifference,
	WearResponse
} from '../../api/stats';
import { MEASUREMENT_INFO, SIDES, toCanonical, unitFits, type Measurement, type Side, type Stage } from '../../measurements';
import type {
	CapabilityQuery,
	CheckQuery,
	ComebacksQuery,
	CompareQuery,
	ControlQuery,
	DistributionQuery,
	OutliersQuery,
	RatesQuery,
	StatsFilters,
	WearQuery
} from '../../schemas/stats';
import { WEAR_MAX_POINTS } from '../../schemas/stats';
import type { Conn } from '../db/scope';
import { seriesKey, seriesKeys, seriesOf } from '../db/series';
import {
	comebackTallies,
	decisionTallies,
	groupData,
	limitsOn,
	measurementTallies,
	outlierCount,
	outlierPage,
	readingsInTimeOrder,
	readingsWithMileage,
	shopFamilies,
	type DataSource,
	type FamilyRef,
	type GroupData,
	type LimitRow,
	type PositionTally,
	type Selection
} from '../queries/stats';
import {
	capability as capabilityOf,
	compareProportions,
	controlChart,
	countBeyond,
	describe,
	expandCounts,
	linearFit,
	mergeMoments,
	modifiedZ,
	MODIFIED_Z_FACTOR,
	MODIFIED_Z_THRESHOLD,
	momentsOf,
	outlierReasons,
	percentileRank,
	robustOfSorted,
	summarizeSorted,
	tukeyFlag,
	wilson,
	type Moments,
	type ValueCount
} from '../stats';
import { CAUTION, suggestDecision } from './decision-rules';

import { today } from '$lib/domain/days';

/** The filters a response was computed for (absent ones left out). */
function echo(q: Partial<StatsFilters>): EchoFilters {
	const out: EchoFilters = {};
	for (const k of ['family', 'side', 'stage', 'from', 'to', 'machinist', 'customer', 'mileageMin', 'mileageMax'] as const) {
		const v = q[k];
		if (v !== undefined) (out as Record<string, unknown>)[k] = v;
	}
	return out;
}

const label = (f: FamilyRef): FamilyLabel => ({ id: f.id, code: f.code });

interface Resolved {
	families: FamilyRef[];
	byId: Map<string, FamilyRef>;
	family: FamilyRef | null;
}

/** The shop's families, and the one `code` names (404 when it names none). */
export async function resolveFamily(conn: Conn, shopId: string, code: string | undefined): Promise<Resolved> {
	const families = await shopFamilies(conn, shopId);
	const byId = new Map(families.map((f) => [f.id, f]));
	if (!code) return { families, byId, family: null };
	const alike = families.filter((f) => f.code.toLowerCase() === code.toLowerCase());
	const family = families.find((f) => f.code === code) ?? (alike.length === 1 ? alike[0] : null);
	if (!family) {
		const known = families.map((f) => f.code).join(', ');
		error(404, `No engine family "${code}" in this shop.${known ? ` Families: ${known}.` : ' The shop has no families yet.'}`);
	}
	return { families, byId, family };
}

export function selection(q: Partial<StatsFilters>, keys: number[], family: FamilyRef | null): Selection {
	return {
		familyIds: family ? [family.id] : null,
		keys,
		from: q.from ?? null,
		to: q.to ?? null,
		machinist: q.machinist ?? null,
		customer: q.customer ?? null,
		mileageMin: q.mileageMin ?? null,
		mileageMax: q.mileageMax ?? null
	};
}

const limitKey = (familyId: string, key: number) => `${familyId}|${key}`;

async function limitsMap(conn: Conn, shopId: string, day: string, only?: { familyIds?: string[] | null; keys?: number[] }): Promise<Map<string, LimitRow>> {
	const rows = await limitsOn(conn, shopId, day, only);
	return new Map(rows.map((l) => [limitKey(l.familyId, l.key), l]));
}

const limitInfo = (l: LimitRow | undefined | null): LimitInfo | null =>
	l ? { min: l.min, max: l.max, effectiveFrom: l.effectiveFrom } : null;

// ---------------------------------------------------------------------------------------------
// Distributions

/** Pools groups: frequency tables added value by value, moments merged (Chan et al.). */
function pool(groups: readonly GroupData[]): { counts: ValueCount[]; moments: Moments } {
	if (groups.length === 1) return groups[0];
	const counts = new Map<number, number>();
	let moments: Moments = momentsOf([]);
	for (const g of groups) {
		for (const [v, n] of g.counts) counts.set(v, (counts.get(v) ?? 0) + n);
		moments = mergeMoments(moments, g.moments);
	}
	return { counts: [...counts].sort((a, b) => a[0] - b[0]), moments };
}

/** The summary of pooled groups, each judged against its own limits in force. */
function summarize(groups: readonly GroupData[], limits: Map<string, LimitRow>, single: LimitRow | null): DistributionSummary {
	const { counts, moments } = pool(groups);
	const sorted = expandCounts(counts);
	const s = summarizeSorted(sorted, sorted.length ? moments : undefined);
	const fenced = countBeyond(counts, s.fences.low, s.fences.high);
	let below = 0;
	let above = 0;
	let judged = 0;
	for (const g of groups) {
		const l = limits.get(limitKey(g.familyId, g.key));
		if (!l) continue;
		const b = countBeyond(g.counts, l.min, l.max);
		below += b.below;
		above += b.above;
		judged += g.moments.n;
	}
	return {
		...s,
		tukeyOutside: fenced.below + fenced.above,
		limits: limitInfo(single),
		outside: { below, above, judged, share: judged ? (below + above) / judged : null }
	};
}

export async function distribution(conn: Conn, shopId: string, q: DistributionQuery, opts: { source?: 'auto' | 'readings' } = {}): Promise<DistributionResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const asOf = q.to ?? today();
	const sel = selection(q, keys, family);
	const [{ groups, source }, limits] = await Promise.all([
		groupData(conn, shopId, sel, opts),
		limitsMap(conn, shopId, asOf, { familyIds: sel.familyIds, keys })
	]);
	const single = family && q.side && q.stage ? (limits.get(limitKey(family.id, keys[0])) ?? null) : null;
	return {
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		limitsAsOf: asOf,
		source,
		...summarize(groups, limits, single)
	};
}

export async function compare(conn: Conn, shopId: string, q: CompareQuery, opts: { source?: 'auto' | 'readings' } = {}): Promise<CompareResponse> {
	const { byId } = await resolveFamily(conn, shopId, undefined);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const asOf = q.to ?? today();
	const [{ groups, source }, limits] = await Promise.all([
		groupData(conn, shopId, selection(q, keys, null), opts),
		limitsMap(conn, shopId, asOf, { keys })
	]);
	const perFamily = new Map<string, GroupData[]>();
	for (const g of groups) perFamily.set(g.familyId, [...(perFamily.get(g.familyId) ?? []), g]);
	const families = [...perFamily].map(([familyId, gs]) => {
		const f = byId.get(familyId) ?? { id: familyId, code: '?', cylinders: 0 };
		const single = q.side && q.stage ? (limits.get(limitKey(familyId, keys[0])) ?? null) : null;
		return { family: label(f), ...summarize(gs, limits, single) };
	});
	families.sort((a, b) => {
		const ma = a.quantiles.p50;
		const mb = b.quantiles.p50;
		if (ma !== mb) return ma === null ? 1 : mb === null ? -1 : ma - mb;
		return a.family.code.localeCompare(b.family.code);
	});
	return { measurement: q.measurement, unit: MEASUREMENT_INFO[q.measurement].unit, filters: echo(q), limitsAsOf: asOf, source, families };
}

// ---------------------------------------------------------------------------------------------
// One reading

export async function checkReading(conn: Conn, shopId: string, q: CheckQuery): Promise<CheckResponse> {
	const info = MEASUREMENT_INFO[q.measurement];
	const unit = q.unit ?? info.unit;
	if (!unitFits(q.measurement, unit)) {
		error(400, `unit ${unit} does not fit ${q.measurement}; use ${info.units.join(' or ')}`);
	}
	const value = toCanonical(q.value, unit);
	if (value > info.max) error(400, `value ${value} ${info.unit} is beyond any plausible ${info.label.toLowerCase()} (at most ${info.max})`);
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const key = seriesKey(q.measurement, q.stage, q.side);
	const [{ groups }, limits] = await Promise.all([
		groupData(conn, shopId, selection({}, [key], fam), { moments: false }),
		limitsMap(conn, shopId, today(), { familyIds: [fam.id], keys: [key, seriesKey(q.measurement, 'final', q.side)] })
	]);
	const limit = limits.get(limitKey(fam.id, key)) ?? null;
	const rework = q.stage === 'as_received' ? (limits.get(limitKey(fam.id, seriesKey(q.measurement, 'final', q.side))) ?? null) : null;
	const sorted = groups[0] ? expandCounts(groups[0].counts) : [];
	const fleet = robustOfSorted(sorted);
	const { median, mad, fences } = fleet;
	const over = limit?.max != null && value > limit.max;
	const under = limit?.min != null && value < limit.min;
	const rank = percentileRank(sorted, value);
	return {
		family: label(fam),
		side: q.side,
		stage: q.stage,
		measurement: q.measurement,
		entered: { value: q.value, unit },
		value,
		unit: info.unit,
		limits: limitInfo(limit),
		withinLimits: limit ? !(over || under) : null,
		broken: over ? 'max' : under ? 'min' : null,
		fleet,
		percentile: rank === null ? null : 100 * rank,
		robustZ: modifiedZ(value, median, mad),
		tukey: tukeyFlag(value, fences),
		reasons: outlierReasons({ value, limits: { min: limit?.min, max: limit?.max }, fences, median, mad, decimals: info.decimals }),
		suggestion: suggestDecision(q.measurement, q.stage, value, limit, rework),
		caution: CAUTION
	};
}

// ---------------------------------------------------------------------------------------------
// Outliers

export async function outliers(conn: Conn, shopId: string, q: OutliersQuery): Promise<OutliersResponse> {
	const { family, byId } = await resolveFamily(conn, shopId, q.family);
	const keys = seriesKeys(q.measurement, q.stage, q.side);
	const sel = selection(q, keys, family);
	const { groups, source } = await groupData(conn, shopId, sel);
	const judged = groups.map((g) => {
		const s = summarizeSorted(expandCounts(g.counts), g.moments.n ? g.moments : undefined);
		return { g, s };
	});
	const params = judged.map(({ g, s }) => ({
		familyId: g.familyId,
		key: g.key,
		low: s.fences.low,
		high: s.fences.high,
		median: s.quantiles.p50,
		mad: s.mad
	}));
	const byGroup = new Map(params.map((p) => [limitKey(p.familyId, p.key), p]));
	const opts = { factor: MODIFIED_Z_FACTOR, zLimit: MODIFIED_Z_THRESHOLD };
	const rows = await outlierPage(conn, shopId, sel, params, { ...opts, sort: q.sort, limit: q.pageSize, offset: (q.page - 1) * q.pageSize });
	const total = rows[0]?.total ?? (q.page > 1 ? await outlierCount(conn, shopId, sel, params, opts) : 0);
	const fam = (id: string) => label(byId.get(id) ?? { id, code: '?', cylinders: 0 });
	return {
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		source,
		page: q.page,
		pageSize: q.pageSize,
		sort: q.sort,
		total,
		pages: Math.ceil(total / q.pageSize),
		groups: judged.map(({ g, s }) => {
			const { side, stage } = seriesOf(g.key);
			return { family: fam(g.familyId), side, stage, n: s.n, median: s.quantiles.p50, mad: s.mad, fences: s.fences };
		}),
		items: rows.map((r) => {
			const p = byGroup.get(limitKey(r.familyId, r.key))!;
			const fences = { low: p.low, high: p.high };
			return {
				id: r.id,
				family: fam(r.familyId),
				side: r.side,
				stage: seriesOf(r.key).stage,
				cylinder: r.cylinder,
				valve: r.valve,
				headId: r.headId,
				serial: r.serial,
				value: r.value,
				measuredAt: new Date(r.measuredAt).toISOString(),
				measuredBy: r.measuredBy,
				limits: r.limitFrom ? { min: r.limitMin, max: r.limitMax, effectiveFrom: r.limitFrom } : null,
				modifiedZ: modifiedZ(r.value, p.median, p.mad),
				reasons: outlierReasons({ value: r.value, limits: { min: r.limitMin, max: r.limitMax }, fences, median: p.median, mad: p.mad, decimals: MEASUREMENT_INFO[q.measurement].decimals })
			};
		})
	};
}

// ---------------------------------------------------------------------------------------------
// Rates

/** Measurements taken only at the final check: their rates default to that stage. */
const FINAL_ONLY: readonly Measurement[] = ['roughness_ra', 'vacuum_hold', 'fluid_hold'];

function cell(failures: number, n: number): RateCell {
	const w = wilson(failures, n);
	return { failures, n, rate: w.rate, ci95: { low: w.low, high: w.high } };
}

function difference(intake: RateCell, exhaust: RateCell): SideDifference | null {
	if (intake.n === 0 || exhaust.n === 0) return null;
	const c = compareProportions(intake.failures, intake.n, exhaust.failures, exhaust.n);
	return {
		test: c.test,
		p: c.p,
		statistic: c.statistic,
		df: c.df,
		minExpected: c.minExpected,
		difference: c.difference,
		ci95: { low: c.differenceLow, high: c.differenceHigh }
	};
}

function sum(rows: readonly PositionTally[]): RateCell {
	let f = 0;
	let n = 0;
	for (const r of rows) {
		f += r.failures;
		n += r.n;
	}
	return cell(f, n);
}

function bySide(rows: readonly PositionTally[]): Record<Side, RateCell> {
	return Object.fromEntries(SIDES.map((s) => [s, sum(rows.filter((r) => r.side === s))])) as Record<Side, RateCell>;
}

export async function rates(conn: Conn, shopId: string, q: RatesQuery): Promise<RatesResponse> {
	const { family, byId } = await resolveFamily(conn, shopId, q.family);
	let tallies: PositionTally[];
	let check: RatesResponse['check'];
	if (q.check.kind === 'measurement') {
		const m = q.check.measurement;
		const stage: Stage = q.stage ?? (FINAL_ONLY.includes(m) ? 'final' : 'as_received');
		check = { kind: 'measurement', measurement: m, stage };
		tallies = await measurementTallies(conn, shopId, selection(q, seriesKeys(m, stage, q.side), family));
	} else {
		check = { kind: 'decision', decision: q.check.decision };
		tallies = await decisionTallies(
			conn,
			shopId,
			{
				familyIds: family ? [family.id] : null,
				side: q.side ?? null,
				from: q.from ?? null,
				to: q.to ?? null,
				customer: q.customer ?? null,
				mileageMin: q.mileageMin ?? null,
				mileageMax: q.mileageMax ?? null
			},
			q.check.decision
		);
	}
	const fam = (id: string) => label(byId.get(id) ?? { id, code: '?', cylinders: 0 });
	const sides = bySide(tallies);
	const familyIds = [...new Set(tallies.map((t) => t.familyId))];
	const families = familyIds
		.map((id) => {
			const rows = tallies.filter((t) => t.familyId === id);
			const s = bySide(rows);
			return { family: fam(id), ...sum(rows), bySide: s, sideDifference: difference(s.intake, s.exhaust) };
		})
		.sort((a, b) => a.family.code.localeCompare(b.family.code));
	const byCylinder = tallies
		.map((t) => ({ family: fam(t.familyId), side: t.side, cylinder: t.cylinder, ...cell(t.failures, t.n) }))
		.sort((a, b) => a.family.code.localeCompare(b.family.code) || a.side.localeCompare(b.side) || a.cylinder - b.cylinder);
	return {
		check,
		unit: 'valve position',
		filters: echo(q),
		overall: sum(tallies),
		bySide: sides,
		sideDifference: difference(sides.intake, sides.exhaust),
		families,
		byCylinder
	};
}

export async function comebacks(conn: Conn, shopId: string, q: ComebacksQuery): Promise<ComebacksResponse> {
	const { family, byId } = await resolveFamily(conn, shopId, q.family);
	const rows = await comebackTallies(conn, shopId, {
		familyIds: family ? [family.id] : null,
		from: q.from ?? null,
		to: q.to ?? null,
		customer: q.customer ?? null,
		mileageMin: q.mileageMin ?? null,
		mileageMax: q.mileageMax ?? null
	});
	const released = rows.reduce((s, r) => s + r.released, 0);
	const back = rows.reduce((s, r) => s + r.cameBack, 0);
	return {
		filters: echo(q),
		unit: 'released head',
		overall: cell(back, released),
		families: rows
			.map((r) => ({ family: label(byId.get(r.familyId) ?? { id: r.familyId, code: '?', cylinders: 0 }), ...cell(r.cameBack, r.released) }))
			.sort((a, b) => a.family.code.localeCompare(b.family.code))
	};
}

// ---------------------------------------------------------------------------------------------
// Capability, control, wear

export async function capabilityStudy(conn: Conn, shopId: string, q: CapabilityQuery): Promise<CapabilityResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const key = seriesKey(q.measurement, 'final', q.side);
	const asOf = q.to ?? today();
	const [rows, limits] = await Promise.all([
		readingsInTimeOrder(conn, shopId, selection(q, [key], fam)),
		limitsMap(conn, shopId, asOf, { familyIds: [fam.id], keys: [key] })
	]);
	const limit = limits.get(limitKey(fam.id, key)) ?? null;
	if (limit && limit.min !== null && limit.max !== null && !(limit.min < limit.max)) {
		error(422, `The final limits ${limit.min}–${limit.max} leave no tolerance, so capability cannot be computed.`);
	}
	const c = capabilityOf(
		rows.map((r) => r.value),
		{ lsl: limit?.min ?? null, usl: limit?.max ?? null }
	);
	return {
		family: label(fam),
		side: q.side,
		stage: 'final',
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		limits: limitInfo(limit),
		limitsAsOf: asOf,
		...c
	};
}

export async function control(conn: Conn, shopId: string, q: ControlQuery): Promise<ControlResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const key = seriesKey(q.measurement, q.stage, q.side);
	const [rows, limits] = await Promise.all([
		readingsInTimeOrder(conn, shopId, selection(q, [key], fam), q.limit),
		limitsMap(conn, shopId, q.to ?? today(), { familyIds: [fam.id], keys: [key] })
	]);
	const chart = controlChart(rows.map((r) => ({ t: new Date(r.measuredAt).getTime(), value: r.value })));
	const beyond = new Set(chart.beyondLimits);
	const mrBeyond = new Set(chart.mrBeyondLimits);
	return {
		family: label(fam),
		side: q.side,
		stage: q.stage,
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		total: rows[0]?.total ?? 0,
		n: chart.n,
		centre: chart.centre,
		ucl: chart.ucl,
		lcl: chart.lcl,
		mrBar: chart.mrBar,
		mrUcl: chart.mrUcl,
		mrLcl: chart.mrLcl,
		specLimits: limitInfo(limits.get(limitKey(fam.id, key))),
		points: chart.points.map((p, i) => {
			const r = rows[p.sourceIndex];
			return {
				id: r.id,
				t: new Date(p.t).toISOString(),
				value: p.value,
				mr: p.mr,
				serial: r.serial,
				measuredBy: r.measuredBy,
				beyond: beyond.has(i),
				mrBeyond: mrBeyond.has(i)
			};
		}),
		beyondLimits: chart.beyondLimits,
		mrBeyondLimits: chart.mrBeyondLimits
	};
}

export async function wear(conn: Conn, shopId: string, q: WearQuery): Promise<WearResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const rows = await readingsWithMileage(conn, shopId, selection(q, seriesKeys(q.measurement, q.stage, q.side), family));
	const fit = linearFit(
		rows.map((r) => r.mileageKm),
		rows.map((r) => r.value)
	);
	const band: WearResponse['band'] = [];
	if (rows.length) {
		let lo = Infinity;
		let hi = -Infinity;
		for (const r of rows) {
			if (r.mileageKm < lo) lo = r.mileageKm;
			if (r.mileageKm > hi) hi = r.mileageKm;
		}
		for (let i = 0; i <= 40; i++) {
			const b = fit.band(lo + ((hi - lo) * i) / 40);
			if (b) band.push(b);
		}
	}
	// Systematic sample in reading order: the same readings give the same points.
	const sampled = rows.length > WEAR_MAX_POINTS;
	const picked = sampled ? Array.from({ length: WEAR_MAX_POINTS }, (_, i) => rows[Math.floor((i * rows.length) / WEAR_MAX_POINTS)]) : rows;
	const per10k = (x: number | null) => (x === null ? null : x * 10_000);
	return {
		measurement: q.measurement,
		stage: q.stage,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		n: fit.n,
		slopePer10000Km: per10k(fit.slope),
		intercept: fit.intercept,
		r2: fit.r2,
		residualSd: fit.residualSd,
		slopeSePer10000Km: per10k(fit.slopeSe),
		band,
		points: picked.map((r) => ({ mileageKm: r.mileageKm, value: r.value })),
		sampled
	};
}

// ---------------------------------------------------------------------------------------------
// Numbers sent by the client

export function describeValues(values: readonly number[]): DescribeResponse {
	const s = describe(values);
	let outside = 0;
	for (const x of values) if (tukeyFlag(x, s.fences)) outside++;
	return { ...s, tukeyOutside: outside };
}

export type { DataSource };
