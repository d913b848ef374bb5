// Text as people and scripts send it, checked once for every schema: PostgreSQL refuses a NUL
// byte in text, and other control characters (C0, DEL, C1) have no business in a name, a
// filter or a header. Multi-line fields (complaints, notes) keep tab and line breaks.
import { z } from 'zod';

/** C0 controls, DEL and C1 controls. */
const CONTROL = /[\u0000-\u001f\u007f-\u009f]/;
/** The same without tab, line feed and carriage return. */
const CONTROL_IN_LINES = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f]/;

/** A message naming the field when one was given ("customer must not …"), a sentence otherwise. */
function controlMessage(name?: string): string {
	return name
		? `${name} must not contain control characters (such as a NUL byte or a line break)`
		: 'Use letters, digits and punctuation only (no control characters such as a NUL byte).';
}

export function hasControl(s: string, multiline = false): boolean {
	return (multiline ? CONTROL_IN_LINES : CONTROL).test(s);
}

/** A string without control characters (tab and line breaks allowed when `multiline`). */
export function text(name?: string, opts: { multiline?: boolean } = {}) {
	return z.string().refine((s) => !hasControl(s, opts.multiline), controlMessage(name));
}

/** A path on this site to go to after a step (`/heads?page=2`), or null: nothing that a browser
 * could read as another host (`//x`, `/\x`, tabs or line breaks it strips, `/%09/x`…). */
export function sitePath(value: unknown): string | null {
	if (typeof value !== 'string' || value.length > 2000) return null;
	if (!value.startsWith('/') || value.startsWith('//')) return null;
	if (/[\\\u0000-\u0020\u007f-\u009f]/.test(value)) return null;
	try {
		const base = 'http://lapmark.invalid';
		const url = new URL(value, base);
		if (url.origin !== base) return null;
		// Decoded once more, as some servers and browsers would: still a path here.
		const decoded = decodeURIComponent(url.pathname);
		if (decoded.startsWith('//') || /[\\\u0000-\u0020\u007f-\u009f]/.test(decoded.slice(0, 2))) return null;
	} catch {
		return null;
	}
	return value;
}

/** Days the app stores and filters by; outside them a date is a typing slip (and PostgreSQL's
 * and JavaScript's calendars part ways after year 9999). */
export const FIRST_DAY = '1900-01-01';
export const LAST_DAY = '2999-12-31';

export function isCalendarDay(s: string): boolean {
	if (!/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
	const d = new Date(`${s}T00:00:00Z`);
	return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
}

/** A calendar day written YYYY-MM-DD between FIRST_DAY and LAST_DAY. Messages name `name` when
 * given (query parameters), or speak to the person filling in a form otherwise. */
export function calendarDay(name?: string) {
	const what = name ? `${name} must be` : 'Use';
	return z
		.string()
		.regex(/^\d{4}-\d{2}-\d{2}$/, name ? `${name} must be a date like 2026-01-31` : 'Use a date like 2026-01-31.')
		.refine(isCalendarDay, name ? `${name} is not a calendar date` : 'That date does not exist.')
		.refine((s) => s >= FIRST_DAY && s <= LAST_DAY, `${what} a day between ${FIRST_DAY} and ${LAST_DAY}${name ? '' : '.'}`);
}
