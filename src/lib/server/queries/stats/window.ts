// Calendar arithmetic of a date range (UTC days): which whole months the per-month summaries
// answer for, and which partial months at either end are read from readings.
import { addDays } from '../../../domain/days';

export { addDays };
function monthStart(day: string): string {
	return `${day.slice(0, 7)}-01`;
}
function nextMonth(day: string): string {
	const d = new Date(`${monthStart(day)}T00:00:00Z`);
	d.setUTCMonth(d.getUTCMonth() + 1);
	return d.toISOString().slice(0, 10);
}
/** The first instant (UTC) of a day, for a timestamptz parameter. */
export const stamp = (day: string) => `${day}T00:00:00Z`;

/** A half-open interval of measured_at, [start, end), as UTC days; null is unbounded. */
export interface DayRange {
	start: string | null;
	end: string | null;
}

export interface Window {
	/** Whole months the summaries answer for: month ∈ [monthFrom, monthTo); null when none. */
	months: DayRange | null;
	/** The rest of the range, read from readings. */
	edges: DayRange[];
}

/**
 * Splits an inclusive day range into the whole calendar months (UTC) inside it, which the
 * summaries answer, and the partial months at either end, which are read from readings.
 */
export function splitWindow(from: string | null, to: string | null): Window {
	const end = to ? addDays(to, 1) : null;
	const fullFrom = from ? (from === monthStart(from) ? from : nextMonth(from)) : null;
	const fullEnd = end ? monthStart(end) : null;
	if (fullFrom && fullEnd && fullFrom >= fullEnd) return { months: null, edges: [{ start: from, end }] };
	const edges: DayRange[] = [];
	if (from && fullFrom && from < fullFrom) edges.push({ start: from, end: fullFrom });
	if (end && fullEnd && fullEnd < end) edges.push({ start: fullEnd, end });
	return { months: { start: fullFrom, end: fullEnd }, edges };
}

