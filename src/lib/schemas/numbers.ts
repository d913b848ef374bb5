// A number typed into a form field, read by the one reader of typed numbers
// (domain/numbers.ts): thousands separators, either decimal mark, a clear message for an
// ambiguous or wrong text. Empty means "not given" (null).
import { z } from 'zod';
import { parseTypedNumber, type NumberOptions } from '$lib/domain/numbers';
import { text } from './text';

export type TypedNumberOptions = Omit<NumberOptions, 'decimal'> & { decimal?: NumberOptions['decimal'] };

/** The number in `s`, null when empty, or undefined after adding the reader's message to `ctx`. */
export function readTypedNumber(s: string, opts: TypedNumberOptions, ctx: z.RefinementCtx, path: (string | number)[] = []): number | null | undefined {
	if (s.trim() === '') return null;
	const r = parseTypedNumber(s, { decimal: null, ...opts });
	if (r.ok) return r.value;
	ctx.addIssue({ code: 'custom', path, message: r.message });
	return undefined;
}

/** A form field holding a number; '' is null. The shop's decimal mark is not known yet: either
 * mark is taken when the text reads one way only. */
export function typedNumber(opts: TypedNumberOptions = {}) {
	return text()
		.trim()
		.max(24, 'That is too long for a number.')
		.transform((s, ctx) => {
			const v = readTypedNumber(s, opts, ctx);
			return v === undefined ? z.NEVER : v;
		});
}
