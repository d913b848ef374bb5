// The series key: measurement × stage × side as one small integer, computed exactly as the
// database's lapmark_series() (drizzle/0004_stats_summaries.sql) computes readings.series_key
// and the summary tables' key. Queries filter on it because, under row-level security, only
// leakproof comparisons narrow an index scan, and PostgreSQL does not mark enum equality
// leakproof (tests/integration/stats-summaries.spec.ts checks every combination against the
// database).
import { MEASUREMENTS, SIDES, STAGES, type Measurement, type Side, type Stage } from '../../measurements';

export interface Series {
	measurement: Measurement;
	stage: Stage;
	side: Side;
}

export function seriesKey(measurement: Measurement, stage: Stage, side: Side): number {
	const m = MEASUREMENTS.indexOf(measurement);
	if (m < 0) throw new RangeError(`unknown measurement ${measurement}`);
	return 4 * m + (stage === 'final' ? 2 : 0) + (side === 'exhaust' ? 1 : 0);
}

export function seriesOf(key: number): Series {
	const m = MEASUREMENTS[Math.floor(key / 4)];
	if (!Number.isInteger(key) || key < 0 || !m) throw new RangeError(`not a series key: ${key}`);
	return { measurement: m, stage: STAGES[(key >> 1) & 1], side: SIDES[key & 1] };
}

/** Every key matching a measurement and, when given, a stage and a side. */
export function seriesKeys(measurement: Measurement, stage?: Stage | null, side?: Side | null): number[] {
	const out: number[] = [];
	for (const st of stage ? [stage] : STAGES) for (const sd of side ? [side] : SIDES) out.push(seriesKey(measurement, st, sd));
	return out.sort((a, b) => a - b);
}
