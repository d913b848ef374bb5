// Inputs of the head workflow: the list's query string, intake, decisions, release, comebacks.
import { z } from 'zod';
import { calendarDay, text } from './text';
import { readTypedNumber, typedNumber } from './numbers';
import { DECISION_KINDS, DISTANCE_UNITS, PRESSURE_UNITS } from '$lib/measurements';
import { parsePosKey } from '$lib/inspection';

export const HEAD_STATUSES = ['received', 'inspected', 'in_rework', 'final_check', 'released'] as const;
export const STATUS_LABEL: Record<(typeof HEAD_STATUSES)[number], string> = {
	received: 'Received',
	inspected: 'Inspected',
	in_rework: 'In rework',
	final_check: 'Final check',
	released: 'Released'
};
export const LEAK_PATHS = ['none', 'intake', 'exhaust', 'crankcase', 'coolant'] as const;
export const LEAK_PATH_LABEL: Record<(typeof LEAK_PATHS)[number], string> = {
	none: 'Not heard / none',
	intake: 'Intake side',
	exhaust: 'Exhaust side',
	crankcase: 'Crankcase (rings)',
	coolant: 'Coolant (gasket)'
};
export { DECISION_KINDS };

const day = calendarDay();
const uuid = (message: string) => z.uuid({ message });
/** Most a mileage or an hour meter can show, by unit (a typing slip beyond). */
const USAGE_MAX = { km: 5_000_000, mi: 3_100_000, h: 500_000 } as const;
const USAGE_WHAT = { km: 'mileage', mi: 'mileage', h: 'engine hours' } as const;
/** Mileage or hours as typed ("142,350", "142 350"): whole, not negative, at most USAGE_MAX. */
const usageText = text().trim().max(24, 'That is too long for a number.');
function usageNumber<T extends { usage: string; usageUnit: keyof typeof USAGE_MAX }>(v: T, ctx: z.RefinementCtx) {
	const usage = readTypedNumber(v.usage, { whole: true, max: USAGE_MAX[v.usageUnit], what: USAGE_WHAT[v.usageUnit] }, ctx, ['usage']);
	return { ...v, usage: usage ?? null };
}

export const headFilterSchema = z.object({
	q: text('q').trim().max(100, 'q is at most 100 characters').optional(),
	family: z.uuid({ message: 'Unknown family.' }).optional(),
	status: z.enum(HEAD_STATUSES, { message: 'Unknown status.' }).optional(),
	from: day.optional(),
	to: day.optional(),
	comeback: z.enum(['only', 'none']).optional(),
	sort: z.enum(['serial', 'family', 'customer', 'status', 'received', 'released']).default('received'),
	dir: z.enum(['asc', 'desc']).default('desc'),
	page: z.coerce.number().int().min(1).max(100_000).default(1)
});
export type HeadFilterInput = z.infer<typeof headFilterSchema>;

// ---------------------------------------------------------------------------------------------
// Intake

export const intakeSchema = z
	.object({
		serial: z
			.string()
			.trim()
			.min(1, 'Type the serial or casting number.')
			.max(64, 'At most 64 characters.')
			.regex(/^[^\p{Cc}]+$/u, 'Use letters, digits and punctuation only.'),
		familyId: uuid('Choose the engine family.'),
		customer: text().trim().min(1, 'Name the customer (a garage, a fleet or a person).').max(120, 'At most 120 characters.'),
		customerEmail: text()
			.trim()
			.toLowerCase()
			.max(254, 'That address is too long.')
			.refine((s) => s === '' || z.email().safeParse(s).success, 'That does not look like an e-mail address.')
			.transform((s) => (s === '' ? null : s)),
		receivedOn: day,
		usageUnit: z.enum([...DISTANCE_UNITS, 'h'], { message: 'Choose km, miles or hours.' }),
		usage: usageText,
		complaint: text(undefined, { multiline: true }).trim().max(2000, 'At most 2000 characters.').default(''),
		leakMode: z.enum(['pct', 'pressure'], { message: 'Choose how the leakage was written down.' }),
		pressureUnit: z.enum(PRESSURE_UNITS, { message: 'Choose the gauge’s pressure unit.' })
	})
	.transform(usageNumber);
export type IntakeInput = z.infer<typeof intakeSchema>;

export const leakRowSchema = z.object({
	pct: typedNumber({ max: 100, what: 'leakage (a share: 0 to 100 %)' }),
	pin: typedNumber({ max: 100_000, what: 'the applied pressure' }),
	held: typedNumber({ max: 100_000, what: 'the held pressure' }),
	path: z.enum(LEAK_PATHS, { message: 'Choose where the leak was heard.' })
});

// ---------------------------------------------------------------------------------------------
// Decisions, release, comebacks, report

const posKey = text().refine((s) => parsePosKey(s) !== null, 'Unknown valve position.');

export const decideSchema = z.object({
	pos: posKey,
	kind: z.enum(DECISION_KINDS, { message: 'Choose what to do with this position.' }),
	note: text(undefined, { multiline: true }).trim().max(500, 'At most 500 characters.').default(''),
	acknowledge: z.literal('on').optional()
});

export const releaseSchema = z.object({
	override: z.literal('on').optional(),
	reason: text(undefined, { multiline: true }).trim().max(2000, 'At most 2000 characters.').default('')
});

export const comebackSchema = z
	.object({
		returnedOn: day,
		usageUnit: z.enum([...DISTANCE_UNITS, 'h'], { message: 'Choose km, miles or hours.' }),
		usage: usageText,
		whatFailed: text(undefined, { multiline: true }).trim().min(3, 'Say what failed (a few words at least).').max(2000, 'At most 2000 characters.'),
		positions: z.array(posKey).max(48)
	})
	.transform(usageNumber);
