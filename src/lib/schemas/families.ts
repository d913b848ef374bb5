// Inputs of families, limit versions, seal pass marks and the gauge register.
import { z } from 'zod';
import { calendarDay, text } from './text';
import { readTypedNumber, typedNumber } from './numbers';
import { MEASUREMENTS, STAGES } from '$lib/measurements';

const day = calendarDay();
/** Largest plausible limit by unit: beyond it a text's reading is a slip (so "7,062" mm is 7.062). */
const LIMIT_MAX = { mm: 100, in: 4, um: 1000, uin: 40_000, pct: 100, s: 3600 } as const;
const limitText = text().trim().max(24, 'That is too long for a number.');
const count = (what: string, lo: number, hi: number) =>
	z.coerce.number({ message: `Type the number of ${what}.` }).int(`Whole ${what} only.`).min(lo, `At least ${lo}.`).max(hi, `At most ${hi}.`);

export const familySchema = z.object({
	code: text()
		.trim()
		.regex(/^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$/, 'Letters, digits, dot, dash or underscore, starting with a letter or digit; 32 characters at most.'),
	description: text(undefined, { multiline: true }).trim().max(200, 'At most 200 characters.').default(''),
	cylinders: count('cylinders', 1, 16),
	intakeValves: count('intake valves per cylinder', 1, 3),
	exhaustValves: count('exhaust valves per cylinder', 1, 3),
	stemUnit: z.enum(['mm', 'in'], { message: 'Choose mm or in.' }),
	intakeStem: typedNumber({ max: 100, what: 'the intake stem diameter' }),
	exhaustStem: typedNumber({ max: 100, what: 'the exhaust stem diameter' }),
	copyFrom: z.union([z.literal(''), z.uuid({ message: 'Unknown family.' })]).default('')
});

export const limitSchema = z
	.object({
		stage: z.enum(STAGES, { message: 'Choose as-received or final.' }),
		measurement: z.enum(MEASUREMENTS, { message: 'Choose a measurement.' }),
		side: z.enum(['intake', 'exhaust', 'both'], { message: 'Choose intake, exhaust or both.' }),
		unit: z.enum(['mm', 'in', 'um', 'uin', 'pct', 's'], { message: 'Choose a unit.' }),
		min: limitText,
		max: limitText,
		effectiveFrom: day,
		note: text(undefined, { multiline: true }).trim().max(200, 'At most 200 characters.').default('')
	})
	.transform((v, ctx) => {
		const most = LIMIT_MAX[v.unit];
		const min = readTypedNumber(v.min, { max: most, what: 'the minimum' }, ctx, ['min']);
		const max = readTypedNumber(v.max, { max: most, what: 'the maximum' }, ctx, ['max']);
		if (min === undefined || max === undefined) return z.NEVER;
		if (min === null && max === null) {
			ctx.addIssue({ code: 'custom', path: ['min'], message: 'Give a minimum, a maximum or both.' });
			return z.NEVER;
		}
		if (min !== null && max !== null && min > max) {
			ctx.addIssue({ code: 'custom', path: ['max'], message: 'The maximum must not be below the minimum.' });
			return z.NEVER;
		}
		return { ...v, min, max };
	});

export const sealPassSchema = z.object({
	vacuumHoldPassPct: z.coerce.number({ message: 'Type a percentage.' }).min(50, 'At least 50 %.').max(100, 'At most 100 %.'),
	fluidHoldPassSeconds: z.coerce.number({ message: 'Type seconds.' }).int('Whole seconds.').min(10, 'At least 10 s.').max(3600, 'At most 3600 s.')
});

export const INSTRUMENT_KIND_LABEL: Record<string, string> = {
	micrometer: 'Micrometer',
	bore_gauge: 'Bore gauge',
	small_hole_gauge: 'Small-hole gauge',
	dial_indicator: 'Dial indicator',
	caliper: 'Caliper',
	roughness_tester: 'Roughness tester',
	vacuum_tester: 'Vacuum tester',
	leakdown_tester: 'Leak-down tester',
	other: 'Other'
};

export const instrumentSchema = z.object({
	name: text().trim().min(1, 'Name the gauge.').max(120, 'At most 120 characters.'),
	kind: z.enum(Object.keys(INSTRUMENT_KIND_LABEL) as [string, ...string[]], { message: 'Choose a kind.' }),
	serial: text().trim().min(1, 'Type the gauge’s serial number.').max(64, 'At most 64 characters.'),
	resolution: typedNumber({ max: 100, what: 'the resolution' }),
	resolutionUnit: z.enum(['mm', 'in', 'um'], { message: 'Choose mm, in or µm.' }),
	calibratedOn: day,
	intervalDays: z.coerce.number({ message: 'Type the interval in days.' }).int('Whole days.').min(1, 'At least 1 day.').max(3650, 'At most 3650 days.')
});

export const calibrationSchema = z.object({
	id: z.uuid({ message: 'Unknown gauge.' }),
	calibratedOn: day,
	intervalDays: z.coerce.number({ message: 'Type the interval in days.' }).int('Whole days.').min(1, 'At least 1 day.').max(3650, 'At most 3650 days.'),
	note: text(undefined, { multiline: true }).trim().max(200, 'At most 200 characters.').default('')
});

export const retireSchema = z.object({ id: z.uuid({ message: 'Unknown gauge.' }), retired: z.enum(['yes', 'no']) });
