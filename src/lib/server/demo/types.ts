// The demo's public types: its options, the rows it generates and what generateDemo returns.
// Rows are the tables' own insert types ($inferInsert), narrowed to the columns the demo writes
// and all present; time stamps are ISO text, as COPY and postgres.js take them.
import type { Role } from '../../measurements';
import type {
	apiTokens,
	cylinderLeakage,
	decisions,
	families,
	heads,
	instruments,
	limits,
	memberships,
	readings,
	ShopSettings,
	shops,
	users
} from '../db/schema';

export interface DemoOptions {
	seed?: number;
	/** Last day of the demo history, 'YYYY-MM-DD' (the real seed passes today, UTC). */
	endDate: string;
	/** 1 or 2 shops. */
	shops?: number;
	/** Original jobs across all shops; comebacks come on top. */
	headsTotal?: number;
	months?: number;
	/** Appended to slugs and e-mail domains, so tests can seed beside the real demo. */
	slugSuffix?: string;
}

/** The columns K of a table's insert row, every one present; the columns in Text as ISO strings. */
type Row<T extends { $inferInsert: object }, K extends keyof T['$inferInsert'], Text extends K = never> = {
	[P in K]-?: P extends Text ? string : Exclude<T['$inferInsert'][P], undefined>;
};

export type HeadStatus = Row<typeof heads, 'status'>['status'];
export type DecisionKind = Row<typeof decisions, 'kind'>['kind'];
export type LeakPath = Row<typeof cylinderLeakage, 'leakPath'>['leakPath'];

export type ShopRow = Row<typeof shops, 'id' | 'name' | 'slug'> & {
	settings: Required<Pick<ShopSettings, 'onReject' | 'fluidHoldPassSeconds' | 'vacuumHoldPassPct'>>;
};
export type UserRow = Row<typeof users, 'id' | 'email' | 'emailVerified', 'emailVerified'> & { name: string };
export type MembershipRow = Row<typeof memberships, 'shopId' | 'userId' | 'role'>;
export type FamilyRow = Row<
	typeof families,
	'id' | 'shopId' | 'code' | 'description' | 'cylinders' | 'intakeValves' | 'exhaustValves'
> & { intakeStemMm: number; exhaustStemMm: number };
export type LimitRow = Row<
	typeof limits,
	'id' | 'shopId' | 'familyId' | 'measurement' | 'side' | 'stage' | 'min' | 'max' | 'effectiveFrom' | 'note'
> & { createdBy: string };
export type InstrumentRow = Row<
	typeof instruments,
	'id' | 'shopId' | 'name' | 'kind' | 'serial' | 'resolutionMm' | 'calibratedOn' | 'intervalDays' | 'retired'
>;
export type ApiTokenRow = Row<typeof apiTokens, 'id' | 'shopId' | 'userId' | 'name' | 'prefix' | 'tokenHash' | 'role'>;
export type HeadRow = Row<
	typeof heads,
	| 'id'
	| 'shopId'
	| 'familyId'
	| 'serial'
	| 'customer'
	| 'customerEmail'
	| 'receivedOn'
	| 'releasedOn'
	| 'mileageKm'
	| 'engineHours'
	| 'complaint'
	| 'status'
	| 'comebackOf'
>;
export type DecisionRow = Row<
	typeof decisions,
	'id' | 'shopId' | 'headId' | 'cylinder' | 'side' | 'valve' | 'rule' | 'kind' | 'note' | 'decidedAt',
	'decidedAt'
> & { suggested: DecisionKind; decidedBy: string };
export type LeakageRow = Row<
	typeof cylinderLeakage,
	'id' | 'shopId' | 'headId' | 'cylinder' | 'leakagePct' | 'pressureInKpa' | 'pressureHeldKpa' | 'leakPath'
>;
export type ReadingRow = Row<
	typeof readings,
	| 'shopId'
	| 'headId'
	| 'familyId'
	| 'stage'
	| 'cylinder'
	| 'side'
	| 'valve'
	| 'measurement'
	| 'value'
	| 'measuredAt'
	| 'measuredBy'
	| 'instrumentId',
	'measuredAt'
>;

/** One demo sign-in, as `npm start` prints it. */
export interface DemoSignIn {
	email: string;
	password: string;
	role: Role;
	/** Shop slug. */
	shop: string;
	shopName: string;
	name: string;
	/** The plain API token; only its SHA-256 is stored. */
	token: string;
}

export interface DemoCounts {
	shops: number;
	users: number;
	memberships: number;
	families: number;
	limits: number;
	instruments: number;
	apiTokens: number;
	heads: number;
	readings: number;
	decisions: number;
	cylinderLeakage: number;
}

export interface DemoData {
	options: Required<DemoOptions>;
	shops: ShopRow[];
	users: UserRow[];
	memberships: MembershipRow[];
	families: FamilyRow[];
	limits: LimitRow[];
	instruments: InstrumentRow[];
	apiTokens: ApiTokenRow[];
	/** Sorted by shop, then received date, so an original always precedes its comeback. */
	heads: HeadRow[];
	decisions: DecisionRow[];
	cylinderLeakage: LeakageRow[];
	/** Streams the readings, of one shop or of all; the same sequence on every call. */
	readings(shopId?: string): Generator<ReadingRow>;
	counts: DemoCounts;
	signIns: DemoSignIn[];
}
