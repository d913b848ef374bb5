// Shares of valve positions per check (outside the limits, or given a decision) with Wilson
// intervals and the intake-vs-exhaust difference (Miettinen–Nurminen test and the interval that
// inverts it), and comeback rates per released head.
import type { ComebacksResponse, RateCell, RatesResponse, SideDifference } from '../../../contract';
import { SIDES, type Side, type Stage } from '../../../measurements';
import { defaultRateStage } from '../../../schemas/stats';
import type { ComebacksQuery, RatesQuery } from '../../../schemas/stats';
import type { Conn } from '../../db/scope';
import { seriesKeys } from '../../db/series';
import { comebackTallies, decisionTallies, measurementTallies, type PositionTally } from '../../queries/stats';
import { mnDifference, wilson } from '../../stats';
import { echo, headSelection, labelOf, resolveFamily, selection } from './selection';


function cell(failures: number, n: number): RateCell {
	const w = wilson(failures, n);
	return { failures, n, rate: w.rate, ci95: { low: w.low, high: w.high } };
}

const VERDICT = { higher: 'intake_higher', lower: 'exhaust_higher', unclear: 'not_clearly_different' } as const;

function difference(intake: RateCell, exhaust: RateCell): SideDifference | null {
	if (intake.n === 0 || exhaust.n === 0) return null;
	const c = mnDifference(intake.failures, intake.n, exhaust.failures, exhaust.n);
	return {
		method: 'miettinen_nurminen',
		difference: c.difference,
		ci95: { low: c.low, high: c.high },
		statistic: c.statistic,
		p: c.p,
		pBelow: c.pBelow,
		verdict: VERDICT[c.verdict ?? 'unclear']
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
		const stage: Stage = q.stage ?? defaultRateStage(m);
		check = { kind: 'measurement', measurement: m, stage, stageDefaulted: q.stage === undefined };
		tallies = await measurementTallies(conn, shopId, selection(q, seriesKeys(m, stage, q.side), family));
	} else {
		check = { kind: 'decision', decision: q.check.decision };
		tallies = await decisionTallies(conn, shopId, headSelection(q, family), q.check.decision);
	}
	const fam = (id: string) => labelOf(byId, id);
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
	const rows = await comebackTallies(conn, shopId, headSelection(q, family));
	const released = rows.reduce((s, r) => s + r.released, 0);
	const back = rows.reduce((s, r) => s + r.cameBack, 0);
	return {
		filters: echo(q),
		unit: 'released head',
		overall: cell(back, released),
		families: rows
			.map((r) => ({ family: labelOf(byId, r.familyId), ...cell(r.cameBack, r.released) }))
			.sort((a, b) => a.family.code.localeCompare(b.family.code))
	};
}
