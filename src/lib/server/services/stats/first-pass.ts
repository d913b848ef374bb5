// First-pass yield: the share of heads whose final check passed without a second round, per
// family and per machinist, with Wilson intervals.
import type { FirstPassResponse, YieldCell } from '../../../contract';
import { MEASUREMENTS } from '../../../measurements';
import type { FirstPassQuery } from '../../../schemas/stats';
import type { Conn } from '../../db/scope';
import { seriesKeys } from '../../db/series';
import { firstPassTallies, type FirstPassTally } from '../../queries/stats/first-pass';
import { wilson } from '../../stats';
import { echo, labelOf, resolveFamily, selection } from './selection';

const FINAL_KEYS = MEASUREMENTS.flatMap((m) => seriesKeys(m, 'final')).sort((a, b) => a - b);

function cell(rows: readonly FirstPassTally[]): YieldCell {
	let heads = 0;
	let passed = 0;
	for (const r of rows) {
		heads += r.heads;
		passed += r.passed;
	}
	const w = wilson(passed, heads);
	return { heads, passed, rate: w.rate, ci95: { low: w.low, high: w.high } };
}

/** One cell per machinist, in name order. */
function byMachinist(rows: readonly FirstPassTally[]) {
	const names = [...new Set(rows.map((r) => r.machinist))].sort((a, b) => a.localeCompare(b));
	return names.map((machinist) => ({ machinist, ...cell(rows.filter((r) => r.machinist === machinist)) }));
}

export async function firstPass(conn: Conn, shopId: string, q: FirstPassQuery): Promise<FirstPassResponse> {
	const { family, byId } = await resolveFamily(conn, shopId, q.family);
	const rows = await firstPassTallies(conn, shopId, selection(q, FINAL_KEYS, family));
	const families = [...new Set(rows.map((r) => r.familyId))]
		.map((id) => {
			const mine = rows.filter((r) => r.familyId === id);
			return { family: labelOf(byId, id), ...cell(mine), byMachinist: byMachinist(mine) };
		})
		.sort((a, b) => a.family.code.localeCompare(b.family.code));
	return { filters: echo(q), unit: 'head', overall: cell(rows), families, byMachinist: byMachinist(rows) };
}
