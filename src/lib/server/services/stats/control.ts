// Control charts of one family × series: individuals and moving range with limits from a
// baseline (phase I) held fixed while the most recent readings are charted (phase II), the run
// rules asked for, an EWMA of the same points, and the monthly p-chart of positions outside the
// limits of their day. The baseline is the period stored with "recompute" or, when none is, the
// earliest BASELINE_DEFAULT_N readings of the series: neither depends on the window asked for.
import type { ControlBaseline as BaselineOut, ControlResponse, PChartResponse } from '../../../contract';
import { RULES, WESTERN_ELECTRIC, type RuleId } from '../../../domain/control-rules';
import { MEASUREMENT_INFO } from '../../../measurements';
import type { BaselineForm, ControlQuery, PChartQuery } from '../../../schemas/stats';
import { today } from '../../../domain/days';
import type { Conn } from '../../db/scope';
import { seriesKey, seriesKeys } from '../../db/series';
import { unprocessable } from '../../errors';
import { audit } from '../../queries/audit';
import {
	baselineReadings,
	monthlyPositionTallies,
	readingsInTimeOrder,
	saveBaseline,
	storedBaseline,
	type BaselineReading,
	type FamilyRef,
	type SeriesOfFamily
} from '../../queries/stats';
import { baselineFigures, clippedLimits, controlChart, D4_MR, ewmaChart, pChart, ruleBreaks, sigmaFromMrBar } from '../../stats';
import type { Who } from '../entry';
import { echo, label, limitInfo, limitKey, limitsMap, resolveFamily, selection } from './selection';

/** Readings of the default baseline: the first ones of the series, whatever window is charted. */
export const BASELINE_DEFAULT_N = 100;
/** Fewest readings a chosen baseline period may hold. */
export const BASELINE_MIN_N = 20;

const dayOf = (d: Date) => new Date(d).toISOString().slice(0, 10);

/** Where a family × series' limits come from: its stored baseline, or its earliest readings. */
async function baselineFor(conn: Conn, shopId: string, s: SeriesOfFamily): Promise<BaselineOut | null> {
	const stored = await storedBaseline(conn, shopId, s);
	if (stored) {
		return {
			source: 'stored',
			from: stored.fromDay,
			to: stored.toDay,
			n: stored.n,
			centre: stored.centre,
			mrBar: stored.mrBar,
			sigma: sigmaFromMrBar(stored.mrBar),
			setAt: stored.setAt.toISOString(),
			setBy: stored.setByLabel,
			description: `Readings of ${stored.fromDay} to ${stored.toDay} (${stored.n}), chosen by ${stored.setByLabel} on ${dayOf(stored.setAt)}`
		};
	}
	const first = await baselineReadings(conn, shopId, s.familyId, seriesKey(s.measurement, s.stage, s.side), { first: BASELINE_DEFAULT_N });
	const f = baselineFigures(first.map((r) => r.value));
	if (!f) return null;
	const from = dayOf(first[0].measuredAt);
	const to = dayOf(first[first.length - 1].measuredAt);
	return {
		source: 'default',
		from,
		to,
		...f,
		sigma: sigmaFromMrBar(f.mrBar),
		setAt: null,
		setBy: null,
		description: `The first ${f.n} readings of the series (${from} to ${to}); no baseline period has been chosen`
	};
}

type ControlAsk = Omit<ControlQuery, 'rules'> & { rules?: RuleId[] };

export async function control(conn: Conn, shopId: string, q: ControlAsk): Promise<ControlResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const key = seriesKey(q.measurement, q.stage, q.side);
	const rules = q.rules ?? WESTERN_ELECTRIC;
	const [rows, limits, baseline] = await Promise.all([
		readingsInTimeOrder(conn, shopId, selection(q, [key], fam), q.limit),
		limitsMap(conn, shopId, q.to ?? today(), { familyIds: [fam.id], keys: [key] }),
		baselineFor(conn, shopId, { familyId: fam.id, measurement: q.measurement, stage: q.stage, side: q.side })
	]);
	const chart = controlChart(rows.map((r) => ({ t: new Date(r.measuredAt).getTime(), value: r.value })));
	const bounds = MEASUREMENT_INFO[q.measurement].bounds;
	const held = baseline ? clippedLimits(baseline, bounds) : null;
	const mrUcl = baseline ? D4_MR * baseline.mrBar : null;
	const values = chart.points.map((p) => p.value);
	const breaks = baseline ? ruleBreaks(values, baseline.centre, baseline.sigma, rules) : [];
	const rulesAt = new Map<number, RuleId[]>();
	for (const b of breaks) rulesAt.set(b.index, [...(rulesAt.get(b.index) ?? []), b.rule]);
	const points = chart.points.map((p, i) => {
		const r = rows[p.sourceIndex];
		return {
			id: r.id,
			t: new Date(p.t).toISOString(),
			value: p.value,
			mr: p.mr,
			serial: r.serial,
			measuredBy: r.measuredBy,
			beyond: held !== null && (p.value > held.ucl || p.value < held.lcl),
			mrBeyond: mrUcl !== null && p.mr !== null && p.mr > mrUcl,
			rules: rulesAt.get(i) ?? []
		};
	});
	const ewma = baseline && baseline.sigma > 0 && values.length ? ewmaChart(values, baseline.centre, baseline.sigma) : null;
	return {
		family: label(fam),
		side: q.side,
		stage: q.stage,
		measurement: q.measurement,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		total: rows[0]?.total ?? 0,
		n: chart.n,
		baseline,
		centre: baseline?.centre ?? null,
		ucl: held?.ucl ?? null,
		lcl: held?.lcl ?? null,
		uclClipped: held?.uclClipped ?? false,
		lclClipped: held?.lclClipped ?? false,
		rawUcl: held?.rawUcl ?? null,
		rawLcl: held?.rawLcl ?? null,
		bounds: { min: bounds.min, max: bounds.max },
		mrBar: baseline?.mrBar ?? null,
		mrUcl,
		mrLcl: baseline ? 0 : null,
		specLimits: limitInfo(limits.get(limitKey(fam.id, key))),
		points,
		beyondLimits: points.flatMap((p, i) => (p.beyond ? [i] : [])),
		mrBeyondLimits: points.flatMap((p, i) => (p.mrBeyond ? [i] : [])),
		rules,
		ruleBreaks: rules.map((rule) => ({
			rule,
			name: RULES[rule].name,
			description: RULES[rule].description,
			points: breaks.filter((b) => b.rule === rule).map((b) => ({ index: b.index, from: b.from, id: points[b.index].id, t: points[b.index].t, value: points[b.index].value }))
		})),
		ewma
	};
}

/** Monthly share of valve positions outside the limits of their day, with limits for each month's n. */
export async function pchart(conn: Conn, shopId: string, q: PChartQuery): Promise<PChartResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const fam = family as FamilyRef;
	const tallies = await monthlyPositionTallies(conn, shopId, selection(q, seriesKeys(q.measurement, q.stage, q.side ?? null), fam));
	const c = pChart(tallies);
	const kept = tallies.filter((t) => t.n > 0);
	return {
		family: label(fam),
		side: q.side ?? null,
		stage: q.stage,
		measurement: q.measurement,
		filters: echo(q),
		pBar: c.pBar,
		n: c.n,
		failures: c.failures,
		months: c.points.map((p, i) => ({ month: kept[i].month.slice(0, 7), ...p }))
	};
}

/**
 * Stores the readings of `from`–`to` (every reading of the family × series, whatever filters the
 * page has) as the baseline its control limits come from, and records it in the audit log.
 */
export async function recomputeBaseline(conn: Conn, shopId: string, who: Who, f: BaselineForm): Promise<BaselineOut> {
	const { family } = await resolveFamily(conn, shopId, f.family);
	const fam = family as FamilyRef;
	const s: SeriesOfFamily = { familyId: fam.id, measurement: f.measurement, stage: f.stage, side: f.side };
	const readings: BaselineReading[] = await baselineReadings(conn, shopId, fam.id, seriesKey(f.measurement, f.stage, f.side), { from: f.from, to: f.to });
	const figures = baselineFigures(readings.map((r) => r.value));
	if (!figures || figures.n < BASELINE_MIN_N) {
		throw unprocessable(
			`${fam.code} has ${readings.length} ${f.stage === 'final' ? 'final' : 'as-received'} ${f.side} ${MEASUREMENT_INFO[f.measurement].label.toLowerCase()} reading${readings.length === 1 ? '' : 's'} from ${f.from} to ${f.to}; a baseline needs at least ${BASELINE_MIN_N}. Choose a longer period.`
		);
	}
	const before = await storedBaseline(conn, shopId, s);
	const row = await saveBaseline(conn, shopId, { ...s, fromDay: f.from, toDay: f.to, ...figures, setBy: who.userId, setByLabel: who.name });
	await audit(conn, shopId, who, {
		entity: 'control_baseline',
		entityId: row.id,
		action: before ? 'update' : 'create',
		before: before ? { from: before.fromDay, to: before.toDay, n: before.n, centre: before.centre, mrBar: before.mrBar } : undefined,
		after: { family: fam.code, measurement: f.measurement, stage: f.stage, side: f.side, from: f.from, to: f.to, ...figures }
	});
	return (await baselineFor(conn, shopId, s)) as BaselineOut;
}
