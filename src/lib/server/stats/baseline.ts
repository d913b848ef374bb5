// The fixed fleet baseline a suspect entry is judged against ($lib/domain/suspect.ts): per
// family × side × measurement × stage of the whole shop, the count, type-7 median, raw MAD
// (Iglewicz & Hoaglin 1993, docs/REFERENCES.md B7), min and max, and the median and MAD of
// ln(value) over the strictly positive readings. Built from the all-time value counts the
// readings triggers keep (reading_value_totals, drizzle/0008), so it costs one pass over the
// distinct values of a series (a few hundred at 0.001 mm), not over a million readings.
import type { SuspectBaseline } from '../../domain/suspect';
import { expandCounts, robustOfSorted, type ValueCount } from './frequency';

export function baselineOfCounts(counts: readonly ValueCount[]): SuspectBaseline {
	const sorted = expandCounts([...counts].sort((a, b) => a[0] - b[0]));
	const lin = robustOfSorted(sorted);
	// ln is increasing, so the positive readings' logs come out sorted.
	const logs = robustOfSorted(sorted.filter((x) => x > 0).map(Math.log));
	return {
		n: lin.n,
		median: lin.median,
		mad: lin.mad,
		min: sorted.length ? sorted[0] : null,
		max: sorted.length ? sorted[sorted.length - 1] : null,
		logMedian: logs.median,
		logMad: logs.mad
	};
}
