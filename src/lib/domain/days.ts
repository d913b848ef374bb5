// Calendar days as PostgreSQL's date type holds them: 'YYYY-MM-DD', in UTC. A day is exactly
// 86,400,000 ms of the epoch in UTC (no daylight saving), so whole-day steps are plain sums.

export const DAY_MS = 86_400_000;

/** The UTC day of a moment, 'YYYY-MM-DD'. */
export function isoDay(moment: Date): string {
	return moment.toISOString().slice(0, 10);
}

/** Today in UTC, 'YYYY-MM-DD'. */
export function today(): string {
	return isoDay(new Date());
}

/** Days since 1970-01-01 (UTC) of a 'YYYY-MM-DD' day; NaN when it is not a date. */
export function dayNumber(day: string): number {
	return Math.round(Date.parse(`${day}T00:00:00Z`) / DAY_MS);
}

/** The 'YYYY-MM-DD' day of a day number (days since 1970-01-01, UTC). */
export function dayOfNumber(n: number): string {
	return isoDay(new Date(n * DAY_MS));
}

/** 'YYYY-MM-DD' + n days. */
export function addDays(day: string, n: number): string {
	return isoDay(new Date(Date.parse(`${day}T00:00:00Z`) + n * DAY_MS));
}

/** Whole days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: string, to: string): number {
	return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / DAY_MS);
}
