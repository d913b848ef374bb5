// Who is asking, the shop's families and its overview (/api/v1/me, /families, /overview).
import { z } from 'zod';
import { ROLES } from '../measurements';
import { count, day, instant, Interval, maybe, measurement, named, side, stage } from './common';

export const MeResponse = named(
	'MeResponse',
	z.strictObject({
		user: z.strictObject({ id: z.string(), email: z.string(), name: z.string().nullable() }),
		shop: z.strictObject({ id: z.uuid(), name: z.string() }),
		role: z.enum(ROLES),
		via: z.enum(['session', 'token'])
	})
);
export type MeResponse = z.output<typeof MeResponse>;

export const FamilyLimit = named(
	'FamilyLimit',
	z.strictObject({ measurement, side, stage, min: maybe, max: maybe, effectiveFrom: day })
);

export const FamilyInfo = named(
	'Family',
	z.strictObject({
		id: z.uuid(),
		code: z.string(),
		description: z.string(),
		cylinders: z.int(),
		intakeValvesPerCylinder: z.int(),
		exhaustValvesPerCylinder: z.int(),
		nominalStemMm: z.strictObject({ intake: maybe, exhaust: maybe }),
		limits: z.array(FamilyLimit).meta({ description: 'The limit versions in force today.' })
	})
);
export type FamilyInfo = z.output<typeof FamilyInfo>;

export const FamiliesResponse = named('FamiliesResponse', z.strictObject({ families: z.array(FamilyInfo) }));
export type FamiliesResponse = z.output<typeof FamiliesResponse>;

export const OverviewResponse = named(
	'OverviewResponse',
	z.strictObject({
		headsReceivedThisMonth: count,
		headsReleasedThisMonth: count,
		headsInWork: count,
		readingsStored: count,
		failingAsReceived: z.array(z.strictObject({ side, positions: count, failing: count, share: maybe, ci95: Interval })),
		instrumentsDue: z
			.array(z.strictObject({ id: z.uuid(), name: z.string(), serial: z.string(), dueOn: day, daysLeft: z.int() }))
			.meta({ description: 'Gauges whose calibration runs out within 30 days (or has), soonest first.' }),
		latestComebacks: z.array(
			z.strictObject({ headId: z.uuid(), serial: z.string(), family: z.string(), receivedOn: day, originalHeadId: z.uuid(), reason: z.string() })
		),
		latestImports: z
			.array(z.strictObject({ id: z.uuid(), fileName: z.string(), status: z.string(), readings: count, rejected: count, createdAt: instant }))
			.nullable()
			.meta({ description: 'The latest import batches; null for a viewer (imports are for machinists and up).' })
	})
);
export type OverviewResponse = z.output<typeof OverviewResponse>;
