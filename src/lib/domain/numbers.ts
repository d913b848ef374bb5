// One reader of a number as a person types it, for every form, grid cell and import column.
// It takes the shop's way of writing decimals (a point or a comma), thousands separators
// (the other mark, spaces, thin or no-break spaces, an apostrophe) and a leading sign, and it
// never guesses: a text that reads as two different numbers is refused with both readings.
//
// Grouping follows the usual convention of writing numbers (ISO 80000-1 §7.3.1 and the SI
// Brochure §5.4.4 group digits in threes with a space; the comma or point as a thousands mark is
// common practice in many locales): groups of exactly three digits to the left of the decimal
// mark, the first group one to three digits.

/** How a shop, a person or an import file writes the decimal mark. */
export type DecimalMark = 'point' | 'comma';

export interface NumberOptions {
	/** The decimal mark of the writer; null when unknown (an import file whose locale is not set). */
	decimal: DecimalMark | null;
	/** Whole numbers only (mileage, counts): a reading with a fraction is not one of its readings. */
	whole?: boolean;
	/** May the number be below zero? Default false: lengths, miles and pressures are not. */
	negative?: boolean;
	/** The largest plausible value: a reading above it is not one of the text's readings (so
	 * "7,062" in a field of at most 100 reads 7.062 only), and a text with no other is refused. */
	max?: number;
	/** What the field is called in messages, e.g. "mileage". Default "the number". */
	what?: string;
}

export type NumberProblem = 'empty' | 'not_a_number' | 'ambiguous' | 'negative' | 'not_whole' | 'wrong_mark' | 'too_large';

export type ParsedNumber =
	| { ok: true; value: number }
	| { ok: false; problem: NumberProblem; message: string; readings?: number[] };

/** Spaces people and locales put between groups of three: space, no-break, narrow no-break, thin. */
const GROUP_SPACES = /[ \u00a0\u202f\u2009]/g;
const APOSTROPHES = /['\u2019]/g;
const MINUS = /^[-\u2212\u2013]/;

/**
 * The digits of `body` read with `mark` as the decimal mark and `other` as a thousands mark
 * (`other` may be absent), or null when the text does not follow that convention. `body` has no
 * sign and its spaces and apostrophes are already replaced by `_` (a neutral group mark).
 */
function readAs(body: string, mark: '.' | ',', other: '.' | ','): number | null {
	if (body.split(mark).length > 2) return null;
	const [intPart, frac = null] = body.split(mark);
	if (frac !== null && !/^\d*$/.test(frac)) return null;
	if (intPart === '' && (frac === null || frac === '')) return null;
	let digits = intPart;
	if (/[_.,]/.test(intPart)) {
		// Grouped: one kind of group mark, groups of three after a first of one to three digits.
		const marks = new Set(intPart.replace(/\d/g, ''));
		if (marks.size !== 1 || marks.has(mark)) return null;
		const [g] = [...marks];
		if (g !== '_' && g !== other) return null;
		const groups = intPart.split(g);
		// A first group of 0 ("0,350") is never a thousands group.
		if (!/^[1-9]\d{0,2}$/.test(groups[0]) || groups.slice(1).some((x) => !/^\d{3}$/.test(x))) return null;
		digits = groups.join('');
	} else if (!/^\d*$/.test(intPart)) return null;
	const n = Number(`${digits || '0'}.${frac || '0'}`);
	return Number.isFinite(n) ? n : null;
}

const MARK_CHAR: Record<DecimalMark, '.' | ','> = { point: '.', comma: ',' };
const MARK_NAME: Record<DecimalMark, string> = { point: 'a point', comma: 'a comma' };

/** Writes `n` the way the message shows a reading: digits grouped by a thin space, the shop's mark. */
function show(n: number, decimal: DecimalMark | null): string {
	const [i, f] = String(Math.abs(n)).split('.');
	const grouped = i.replace(/\B(?=(\d{3})+(?!\d))/g, '\u2009');
	const mark = decimal === 'comma' ? ',' : '.';
	return `${n < 0 ? '−' : ''}${grouped}${f ? mark + f : ''}`;
}

/** Reads a number as typed. Empty text is `{ ok: false, problem: 'empty' }`: the caller decides if that is allowed. */
export function parseTypedNumber(text: string, opts: NumberOptions): ParsedNumber {
	const what = opts.what ?? 'the number';
	const raw = text.trim();
	if (raw === '') return { ok: false, problem: 'empty', message: `Type ${what}.` };
	let body = raw;
	let sign = 1;
	if (MINUS.test(body)) {
		sign = -1;
		body = body.slice(1).trimStart();
	} else if (body.startsWith('+')) body = body.slice(1).trimStart();
	body = body.replace(GROUP_SPACES, '_').replace(APOSTROPHES, '_');
	const notNumber: ParsedNumber = {
		ok: false,
		problem: 'not_a_number',
		message: `“${raw}” is not a number: type digits${opts.whole ? '' : ` with ${opts.decimal ? MARK_NAME[opts.decimal] : 'a point or a comma'} for decimals`}.`
	};
	if (!/^[\d_.,]+$/.test(body) || !/\d/.test(body)) return notNumber;
	const asPoint = readAs(body, '.', ',');
	const asComma = readAs(body, ',', '.');
	let readings: number[];
	if (opts.decimal) {
		const own = opts.decimal === 'point' ? asPoint : asComma;
		const foreign = opts.decimal === 'point' ? asComma : asPoint;
		const ownMark = MARK_CHAR[opts.decimal];
		// The shop's own decimal mark used once is a decimal mark, never a thousands mark.
		const usesOwnMark = body.includes(ownMark);
		readings = [own, usesOwnMark ? null : foreign].filter((x): x is number => x !== null);
		if (own === null && foreign !== null) {
			const value = sign * foreign;
			return {
				ok: false,
				problem: 'wrong_mark',
				message: `“${raw}”: this shop writes decimals with ${MARK_NAME[opts.decimal]}. Did you mean ${show(value, opts.decimal)}?`,
				readings: [value]
			};
		}
	} else {
		readings = [asPoint, asComma].filter((x): x is number => x !== null);
	}
	if (opts.whole) readings = readings.filter((x) => Number.isInteger(x));
	const max = opts.max;
	const plausible = max === undefined ? readings : readings.filter((x) => x <= max);
	if (max !== undefined && readings.length > 0 && plausible.length === 0) {
		return { ok: false, problem: 'too_large', message: `${capital(what)} is at most ${show(max, opts.decimal)}: “${raw}” is more.` };
	}
	readings = [...new Set(plausible)];
	if (readings.length === 0) {
		const any = asPoint ?? asComma;
		if (any !== null && opts.whole) {
			return { ok: false, problem: 'not_whole', message: `${capital(what)} takes whole numbers: “${raw}” is not one.` };
		}
		return notNumber;
	}
	if (readings.length > 1) {
		const both = readings.map((x) => sign * x).sort((a, b) => Math.abs(b) - Math.abs(a));
		return {
			ok: false,
			problem: 'ambiguous',
			message: `“${raw}” — did you mean ${show(both[0], opts.decimal)} or ${show(both[1], opts.decimal)}? Type it without the separator, or with a space between thousands.`,
			readings: both
		};
	}
	const value = sign * readings[0] || 0;
	if (value < 0 && !opts.negative) {
		return { ok: false, problem: 'negative', message: `${capital(what)} cannot be negative.` };
	}
	return { ok: true, value };
}

function capital(s: string): string {
	return s.charAt(0).toUpperCase() + s.slice(1);
}
