// The typed-number reader: worked examples, then properties (fast-check) over every way of
// writing a number it accepts. Grouping in threes: ISO 80000-1 §7.3.1, SI Brochure (9th ed.) §5.4.4.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseTypedNumber, type DecimalMark } from './numbers';

const THIN = '\u2009';

describe('parseTypedNumber: worked examples', () => {
	it('reads a mileage with a thousands comma as the whole number it is', () => {
		expect(parseTypedNumber('142,350', { decimal: 'point', whole: true, what: 'mileage' })).toEqual({ ok: true, value: 142350 });
		expect(parseTypedNumber('142.350', { decimal: 'comma', whole: true })).toEqual({ ok: true, value: 142350 });
		expect(parseTypedNumber('142 350', { decimal: null, whole: true })).toEqual({ ok: true, value: 142350 });
		expect(parseTypedNumber("142'350", { decimal: 'point', whole: true })).toEqual({ ok: true, value: 142350 });
	});

	it('refuses a number that reads two ways and shows both readings', () => {
		const r = parseTypedNumber('142,350', { decimal: 'point' });
		expect(r).toEqual({
			ok: false,
			problem: 'ambiguous',
			message: `“142,350” — did you mean 142${THIN}350 or 142.35? Type it without the separator, or with a space between thousands.`,
			readings: [142350, 142.35]
		});
		expect(parseTypedNumber('7.985', { decimal: null })).toMatchObject({ ok: false, problem: 'ambiguous', readings: [7985, 7.985] });
		expect(parseTypedNumber('7,985', { decimal: 'point' })).toMatchObject({ ok: false, problem: 'ambiguous' });
	});

	it("takes the shop's own decimal mark once as a decimal, never as thousands", () => {
		expect(parseTypedNumber('7.985', { decimal: 'point' })).toEqual({ ok: true, value: 7.985 });
		expect(parseTypedNumber('7,985', { decimal: 'comma' })).toEqual({ ok: true, value: 7.985 });
		expect(parseTypedNumber('1,234.5', { decimal: 'point' })).toEqual({ ok: true, value: 1234.5 });
		expect(parseTypedNumber('1.234,5', { decimal: 'comma' })).toEqual({ ok: true, value: 1234.5 });
		expect(parseTypedNumber(`1${THIN}234,5`, { decimal: 'comma' })).toEqual({ ok: true, value: 1234.5 });
		expect(parseTypedNumber('.5', { decimal: 'point' })).toEqual({ ok: true, value: 0.5 });
		expect(parseTypedNumber('0,035', { decimal: null })).toEqual({ ok: true, value: 0.035 });
	});

	it('says when the other decimal mark was used', () => {
		expect(parseTypedNumber('0,350', { decimal: 'point' })).toEqual({
			ok: false,
			problem: 'wrong_mark',
			message: '“0,350”: this shop writes decimals with a point. Did you mean 0.35?',
			readings: [0.35]
		});
		expect(parseTypedNumber('1.5', { decimal: 'comma' })).toMatchObject({ ok: false, problem: 'wrong_mark', readings: [1.5] });
	});

	it('drops a reading beyond what the field can hold', () => {
		expect(parseTypedNumber('7,062', { decimal: null, max: 100 })).toEqual({ ok: true, value: 7.062 });
		expect(parseTypedNumber('7.062', { decimal: null, max: 100 })).toEqual({ ok: true, value: 7.062 });
		expect(parseTypedNumber('7,062', { decimal: null, max: 10_000 })).toMatchObject({ ok: false, problem: 'ambiguous' });
		expect(parseTypedNumber('6 200 000', { decimal: null, whole: true, max: 5_000_000, what: 'mileage' })).toEqual({
			ok: false,
			problem: 'too_large',
			message: `Mileage is at most 5${THIN}000${THIN}000: “6 200 000” is more.`
		});
	});

	it('gives each wrong thing its own message', () => {
		expect(parseTypedNumber('−100', { decimal: 'point', whole: true, what: 'mileage' })).toEqual({
			ok: false,
			problem: 'negative',
			message: 'Mileage cannot be negative.'
		});
		expect(parseTypedNumber('-0.012', { decimal: 'point', negative: true })).toEqual({ ok: true, value: -0.012 });
		expect(parseTypedNumber('  ', { decimal: 'point', what: 'the mileage' })).toEqual({ ok: false, problem: 'empty', message: 'Type the mileage.' });
		expect(parseTypedNumber('12a', { decimal: 'point' })).toMatchObject({ ok: false, problem: 'not_a_number' });
		expect(parseTypedNumber('1e3', { decimal: 'point' })).toMatchObject({ ok: false, problem: 'not_a_number' });
		expect(parseTypedNumber('1,2,3', { decimal: null })).toMatchObject({ ok: false, problem: 'not_a_number' });
		expect(parseTypedNumber('12.5', { decimal: 'point', whole: true, what: 'mileage' })).toEqual({
			ok: false,
			problem: 'not_whole',
			message: 'Mileage takes whole numbers: “12.5” is not one.'
		});
	});
});

// ---- properties ----

const GROUP_MARKS = [' ', '\u00a0', '\u202f', THIN, "'", '\u2019'];

interface Written {
	text: string;
	value: number;
	/** Written with the other mark as the only group mark, one group, no fraction: reads two ways. */
	ambiguous: boolean;
}

/** A non-negative number (integer part, fraction digits) written with the given decimal mark and grouping. */
function written(decimal: DecimalMark): fc.Arbitrary<Written> {
	return fc
		.record({
			int: fc.integer({ min: 0, max: 999_999_999 }),
			frac: fc.option(fc.stringMatching(/^\d{1,4}$/), { nil: null }),
			group: fc.option(fc.constantFrom('other', ...GROUP_MARKS), { nil: null }),
			sign: fc.constantFrom('', '+')
		})
		.map(({ int, frac, group, sign }) => {
			const own = decimal === 'point' ? '.' : ',';
			const other = decimal === 'point' ? ',' : '.';
			const mark = group === 'other' ? other : group;
			const digits = String(int);
			const grouped = mark ? digits.replace(/\B(?=(\d{3})+(?!\d))/g, mark) : digits;
			const text = `${sign}${grouped}${frac === null ? '' : own + frac}`;
			const value = Number(`${digits}.${frac ?? '0'}`);
			const ambiguous = mark === other && frac === null && grouped.split(other).length === 2;
			return { text, value, ambiguous };
		});
}

/** Runs of one to four digits between marks: mostly near-numbers, often valid under one or both conventions. */
const numberLike = fc
	.array(fc.oneof(fc.stringMatching(/^\d{1,4}$/), fc.constantFrom('.', ',', ' ', "'")), { minLength: 1, maxLength: 6 })
	.map((parts) => parts.join(''));

describe('parseTypedNumber: properties', () => {
	for (const decimal of ['point', 'comma'] as const) {
		it(`any number written the ${decimal} way reads as itself, or is refused as ambiguous with itself among the readings`, () => {
			fc.assert(
				fc.property(written(decimal), (w) => {
					const r = parseTypedNumber(w.text, { decimal });
					if (w.ambiguous) {
						expect(r.ok).toBe(false);
						if (!r.ok) {
							expect(r.problem).toBe('ambiguous');
							expect(r.readings).toContain(w.value);
						}
					} else {
						expect(r).toEqual({ ok: true, value: w.value });
					}
				}),
				{ numRuns: 2000 }
			);
		});

		it(`any whole number written the ${decimal} way, grouped with any mark, reads as itself`, () => {
			fc.assert(
				fc.property(
					written(decimal).filter((w) => Number.isInteger(w.value) && !/[.,]$/.test(w.text)),
					fc.boolean(),
					(w, knownMark) => {
						const plain = w.text.replace(/[.,]\d+$/, '');
						if (plain !== w.text) return;
						expect(parseTypedNumber(w.text, { decimal: knownMark ? decimal : null, whole: true })).toEqual({ ok: true, value: w.value });
					}
				),
				{ numRuns: 2000 }
			);
		});
	}

	it('never guesses: whatever it accepts without a known mark, both conventions agree on or only one allows', () => {
		fc.assert(
			fc.property(numberLike, (text) => {
				const either = parseTypedNumber(text, { decimal: null });
				const point = parseTypedNumber(text, { decimal: 'point' });
				const comma = parseTypedNumber(text, { decimal: 'comma' });
				if (either.ok) {
					const agreeing = [point, comma].filter((r) => r.ok);
					expect(agreeing.length).toBeGreaterThan(0);
					for (const r of agreeing) expect(r).toEqual(either);
				}
				// A text two conventions read as different numbers is never accepted without a mark.
				if (point.ok && comma.ok && point.value !== comma.value) expect(either.ok).toBe(false);
			}),
			{ numRuns: 5000 }
		);
	});
});
