// Deterministic demo data for Lapmark: invented shops, engine families, limits, gauges, users
// and a couple of years of cylinder heads with their readings. The same options always give
// byte-identical output, so tests can hash it and `npm start` can print the same sign-ins.
//
// Everything here is invented: shop, person, customer and family names, serial formats, tokens.
// Readings are plain objects; the bulk of them (readings) come from a generator so that a full
// seed streams into COPY instead of holding a million objects in memory.
import { createHash } from 'node:crypto';
import { randomLcg, randomNormal } from 'd3-random';
import type { Measurement, Role, Side, Stage } from '../../measurements';

// ---------------------------------------------------------------------------------------------
// Public types

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

export type HeadStatus = 'received' | 'inspected' | 'in_rework' | 'final_check' | 'released';
export type DecisionKind =
	| 'reuse'
	| 'lap'
	| 'recut_seat'
	| 'reface_valve'
	| 'replace_valve'
	| 'replace_seat'
	| 'replace_guide'
	| 'knurl_guide';
export type LeakPath = 'none' | 'intake' | 'exhaust' | 'crankcase' | 'coolant';

export interface ShopRow {
	id: string;
	name: string;
	slug: string;
	settings: { onReject: 'abort' | 'skip'; fluidHoldPassSeconds: number; vacuumHoldPassPct: number };
}
export interface UserRow {
	id: string;
	name: string;
	email: string;
	emailVerified: string;
}
export interface MembershipRow {
	shopId: string;
	userId: string;
	role: Role;
}
export interface FamilyRow {
	id: string;
	shopId: string;
	code: string;
	description: string;
	cylinders: number;
	intakeValves: number;
	exhaustValves: number;
	intakeStemMm: number;
	exhaustStemMm: number;
}
export interface LimitRow {
	id: string;
	shopId: string;
	familyId: string;
	measurement: Measurement;
	side: Side;
	stage: Stage;
	min: number | null;
	max: number | null;
	effectiveFrom: string;
	note: string;
	createdBy: string;
}
export interface InstrumentRow {
	id: string;
	shopId: string;
	name: string;
	kind: string;
	serial: string;
	resolutionMm: number | null;
	calibratedOn: string;
	intervalDays: number;
	retired: boolean;
}
export interface ApiTokenRow {
	id: string;
	shopId: string;
	userId: string;
	name: string;
	prefix: string;
	tokenHash: string;
	role: Role;
}
export interface HeadRow {
	id: string;
	shopId: string;
	familyId: string;
	serial: string;
	customer: string;
	customerEmail: string | null;
	receivedOn: string;
	releasedOn: string | null;
	mileageKm: number | null;
	engineHours: number | null;
	complaint: string;
	status: HeadStatus;
	comebackOf: string | null;
}
export interface DecisionRow {
	id: string;
	shopId: string;
	headId: string;
	cylinder: number;
	side: Side;
	valve: number;
	suggested: DecisionKind;
	rule: string;
	kind: DecisionKind;
	note: string;
	decidedBy: string;
	decidedAt: string;
}
export interface LeakageRow {
	id: string;
	shopId: string;
	headId: string;
	cylinder: number;
	leakagePct: number;
	pressureInKpa: number | null;
	pressureHeldKpa: number | null;
	leakPath: LeakPath;
}
export interface ReadingRow {
	shopId: string;
	headId: string;
	familyId: string;
	stage: Stage;
	cylinder: number;
	side: Side;
	valve: number;
	measurement: Measurement;
	value: number;
	measuredAt: string;
	measuredBy: string;
	instrumentId: string | null;
}

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

// ---------------------------------------------------------------------------------------------
// Invented catalogue

interface FamilyTemplate {
	code: string;
	description: string;
	cylinders: number;
	intakeValves: number;
	exhaustValves: number;
	intakeStemMm: number;
	exhaustStemMm: number;
	/** Serial prefix. */
	prefix: string;
	/** Share of the shop's jobs. */
	weight: number;
	/** Guide wear multiplier: > 1.5 marks the families that wear clearly worse. */
	wear: number;
	diesel: boolean;
}

interface ShopTemplate {
	slug: string;
	name: string;
	serialPrefix: string;
	settings: ShopRow['settings'];
	users: Record<Role, string>;
	/** Other people who measure; the machinist user is added in front. */
	machinists: string[];
	families: FamilyTemplate[];
	customers: string[];
	/** Family whose limits get a tighter second version about a year before the end date. */
	tightened: string | null;
	/** Instrument kind that is overdue for calibration at the end date. */
	overdue: string;
}

export const SHOP_TEMPLATES: readonly ShopTemplate[] = [
	{
		slug: 'brackenford',
		name: 'Brackenford Head Works',
		serialPrefix: 'BF',
		settings: { onReject: 'skip', fluidHoldPassSeconds: 120, vacuumHoldPassPct: 90 },
		users: {
			owner: 'Odile Brannock',
			engineer: 'Tomasz Ferrwood',
			machinist: 'Ines Halloway-Pike',
			viewer: 'Rufus Ambery'
		},
		machinists: ['Bram Oyelaran', 'Cosmo Lindqvar', 'Wren Moffatby'],
		families: [
			{ code: 'ALDER-4', description: 'Inline four, 16 valves, petrol', cylinders: 4, intakeValves: 2, exhaustValves: 2, intakeStemMm: 5.5, exhaustStemMm: 5.5, prefix: 'ALD', weight: 0.25, wear: 0.9, diesel: false },
			{ code: 'BIRCH-6', description: 'Inline six, 12 valves, petrol, pushrod', cylinders: 6, intakeValves: 1, exhaustValves: 1, intakeStemMm: 7.0, exhaustStemMm: 7.0, prefix: 'BIR', weight: 0.15, wear: 1.85, diesel: false },
			{ code: 'CEDAR-V8', description: 'V8, both banks as one job, 16 valves, petrol', cylinders: 8, intakeValves: 1, exhaustValves: 1, intakeStemMm: 8.0, exhaustStemMm: 8.0, prefix: 'CED', weight: 0.12, wear: 1.0, diesel: false },
			{ code: 'DOGWOOD-4D', description: 'Inline four, 16 valves, diesel', cylinders: 4, intakeValves: 2, exhaustValves: 2, intakeStemMm: 7.0, exhaustStemMm: 7.0, prefix: 'DOG', weight: 0.2, wear: 0.85, diesel: true },
			{ code: 'ELM-3', description: 'Inline three, 12 valves, petrol', cylinders: 3, intakeValves: 2, exhaustValves: 2, intakeStemMm: 5.0, exhaustStemMm: 5.0, prefix: 'ELM', weight: 0.13, wear: 0.95, diesel: false },
			{ code: 'FIR-6D', description: 'Inline six, 24 valves, diesel', cylinders: 6, intakeValves: 2, exhaustValves: 2, intakeStemMm: 8.0, exhaustStemMm: 8.0, prefix: 'FIR', weight: 0.15, wear: 1.65, diesel: true }
		],
		customers: [
			'Quillby Lane Garage',
			'Saltmarsh Parcel Fleet',
			'Pennywhistle Auto Repair',
			'Orchard Row Motors',
			'Brackenford Haulage',
			'Kestrel Hill Garage',
			'Lowmoor Depot Buses',
			'Fernhollow Taxi Co-op',
			'Stonewick Council Fleet',
			'Marram Coast Couriers',
			'Thistledown Farm Machinery',
			'Copperbeck Club Racing'
		],
		tightened: 'FIR-6D',
		overdue: 'dial_indicator'
	},
	{
		slug: 'saltmarsh',
		name: 'Saltmarsh Valve Works',
		serialPrefix: 'SM',
		settings: { onReject: 'abort', fluidHoldPassSeconds: 120, vacuumHoldPassPct: 90 },
		users: {
			owner: 'Priya Castellane-Rowe',
			engineer: 'Jonah Fairleigh-Osei',
			machinist: 'Matteo Quillan',
			viewer: 'Samir Oakhurst'
		},
		machinists: ['Lotte Brenwick', 'Kofi Marrable', 'Ysolde Penhallow'],
		families: [
			{ code: 'GINKGO-4', description: 'Inline four, 8 valves, petrol', cylinders: 4, intakeValves: 1, exhaustValves: 1, intakeStemMm: 6.0, exhaustStemMm: 6.0, prefix: 'GIN', weight: 0.35, wear: 0.9, diesel: false },
			{ code: 'HAZEL-5', description: 'Inline five, 20 valves, petrol', cylinders: 5, intakeValves: 2, exhaustValves: 2, intakeStemMm: 6.0, exhaustStemMm: 6.0, prefix: 'HAZ', weight: 0.2, wear: 1.05, diesel: false },
			{ code: 'JUNIPER-6D', description: 'Inline six, 24 valves, diesel', cylinders: 6, intakeValves: 2, exhaustValves: 2, intakeStemMm: 7.0, exhaustStemMm: 7.0, prefix: 'JUN', weight: 0.3, wear: 1.0, diesel: true },
			{ code: 'LARCH-8', description: 'V8, both banks as one job, 16 valves, petrol', cylinders: 8, intakeValves: 1, exhaustValves: 1, intakeStemMm: 8.0, exhaustStemMm: 8.0, prefix: 'LAR', weight: 0.15, wear: 0.95, diesel: false }
		],
		customers: [
			'Eelgrass Marine Engines',
			'Shingle Point Garage',
			'Greyheron Taxi Co-op',
			'Ropewalk Motors',
			'Oyster Creek Haulage',
			'Lanternfish Couriers',
			'Driftwood Auto Clinic',
			'Breakwater Bus Depot',
			'Tidemill Farm Services',
			'Sandpiper School Buses'
		],
		tightened: null,
		overdue: 'bore_gauge'
	}
];

const COMPLAINTS = [
	'Blue smoke on start-up',
	'Loss of power, rough idle',
	'Failed leak-down test',
	'Oil consumption above 1 L per 1000 km',
	'Ticking from the valve train',
	'Overheated; head gasket failed',
	'Misfire under load',
	'Routine rebuild at overhaul interval',
	'Coolant loss, suspected head gasket',
	'Hard starting when hot',
	'Burnt exhaust valve suspected',
	'Low compression on one cylinder'
];
const COMEBACK_COMPLAINTS = [
	'Comeback: oil consumption returned',
	'Comeback: misfire after a few weeks',
	'Comeback: leak-down failed on recheck',
	'Comeback: ticking from the valve train',
	'Comeback: blue smoke on start-up again'
];

interface InstrumentTemplate {
	kind: string;
	name: string;
	code: string;
	resolutionMm: number | null;
	intervalDays: number;
}
const INSTRUMENTS: readonly InstrumentTemplate[] = [
	{ kind: 'micrometer', name: 'Outside micrometer 0–25 mm', code: 'MIC', resolutionMm: 0.001, intervalDays: 365 },
	{ kind: 'bore_gauge', name: 'Small-hole gauge set', code: 'BOR', resolutionMm: 0.001, intervalDays: 180 },
	{ kind: 'dial_indicator', name: 'Dial indicator on concentricity stand', code: 'DIA', resolutionMm: 0.001, intervalDays: 365 },
	{ kind: 'caliper', name: 'Seat and margin caliper', code: 'CAL', resolutionMm: 0.01, intervalDays: 365 },
	{ kind: 'roughness_tester', name: 'Surface roughness tester', code: 'RGH', resolutionMm: 0.00001, intervalDays: 365 },
	{ kind: 'vacuum_tester', name: 'Valve vacuum tester', code: 'VAC', resolutionMm: null, intervalDays: 365 }
];
// Which gauge takes which reading. Clearance is computed from bore and stem, and the fluid test
// is timed, so neither has a gauge of its own.
const INSTRUMENT_FOR: Partial<Record<Measurement, string>> = {
	stem_diameter: 'micrometer',
	guide_bore: 'bore_gauge',
	face_runout: 'dial_indicator',
	seat_runout: 'dial_indicator',
	seat_width: 'caliper',
	margin: 'caliper',
	roughness_ra: 'roughness_tester',
	vacuum_hold: 'vacuum_tester'
};

const AR_MEASUREMENTS: readonly Measurement[] = [
	'stem_diameter',
	'guide_bore',
	'clearance',
	'face_runout',
	'seat_runout',
	'seat_width',
	'margin'
];
const FINAL_MEASUREMENTS: readonly Measurement[] = [
	'stem_diameter',
	'guide_bore',
	'clearance',
	'seat_runout',
	'seat_width',
	'roughness_ra',
	'vacuum_hold',
	'fluid_hold'
];

// New stems are undersize of the nominal by this much; exhaust stems run looser (hotter).
export const STEM_OFFSET: Record<Side, number> = { intake: 0.025, exhaust: 0.045 };
const CLEARANCE_NEW: Record<Side, [number, number]> = { intake: [0.025, 0.065], exhaust: [0.04, 0.08] };
const CLEARANCE_SERVICE_MAX: Record<Side, number> = { intake: 0.1, exhaust: 0.12 };
const SEAT_WIDTH: Record<Side, [number, number]> = { intake: [1.0, 1.6], exhaust: [1.4, 2.3] };
const MARGIN_MIN: Record<Side, number> = { intake: 0.8, exhaust: 1.0 };

// ---------------------------------------------------------------------------------------------
// Deterministic helpers

/** 32-bit FNV-1a over the parts, finished with a murmur mix: seeds per shop and per head. */
function mix(...parts: (string | number)[]): number {
	let h = 0x811c9dc5;
	for (const p of parts) {
		const s = String(p);
		for (let i = 0; i < s.length; i++) {
			h ^= s.charCodeAt(i);
			h = Math.imul(h, 0x01000193);
		}
		h ^= 0x7c;
		h = Math.imul(h, 0x01000193);
	}
	h ^= h >>> 16;
	h = Math.imul(h, 0x85ebca6b);
	h ^= h >>> 13;
	h = Math.imul(h, 0xc2b2ae35);
	h ^= h >>> 16;
	return h >>> 0;
}

/** Seeded random numbers (d3-random's LCG): uniform, normal, log-normal, picks. */
export class Rng {
	readonly u: () => number;
	private readonly z: () => number;
	constructor(seed: number) {
		this.u = randomLcg(seed);
		this.z = randomNormal.source(this.u)(0, 1);
	}
	n(mu: number, sd: number): number {
		return mu + sd * this.z();
	}
	/** Log-normal factor with median 1. */
	ln(sigma: number): number {
		return Math.exp(sigma * this.z());
	}
	int(lo: number, hi: number): number {
		return lo + Math.floor(this.u() * (hi - lo + 1));
	}
	range(lo: number, hi: number): number {
		return lo + this.u() * (hi - lo);
	}
	chance(p: number): boolean {
		return this.u() < p;
	}
	pick<T>(xs: readonly T[]): T {
		return xs[Math.floor(this.u() * xs.length)];
	}
	weighted<T extends { weight: number }>(xs: readonly T[]): T {
		let r = this.u() * xs.reduce((s, x) => s + x.weight, 0);
		for (const x of xs) {
			r -= x.weight;
			if (r < 0) return x;
		}
		return xs[xs.length - 1];
	}
}

/** A UUID-shaped id from a hash of the seed and a stable key (version 4 and variant bits set). */
function uuidOf(seed: number, key: string): string {
	const h = createHash('sha256').update(`${seed}|${key}`).digest('hex');
	const v = ((parseInt(h[16], 16) & 0x3) | 0x8).toString(16);
	return `${h.slice(0, 8)}-${h.slice(8, 12)}-4${h.slice(13, 16)}-${v}${h.slice(17, 20)}-${h.slice(20, 32)}`;
}

const DAY_MS = 86_400_000;
function dayOf(iso: string): number {
	if (!/^\d{4}-\d{2}-\d{2}$/.test(iso)) throw new RangeError(`endDate must be YYYY-MM-DD, got ${iso}`);
	const d = Date.parse(`${iso}T00:00:00Z`);
	if (Number.isNaN(d)) throw new RangeError(`endDate is not a date: ${iso}`);
	return Math.round(d / DAY_MS);
}
function dateOf(day: number): string {
	return new Date(day * DAY_MS).toISOString().slice(0, 10);
}
function stampOf(day: number, seconds: number): string {
	return new Date(day * DAY_MS + seconds * 1000).toISOString();
}
function weekday(day: number): number {
	return new Date(day * DAY_MS).getUTCDay();
}
/** Moves a working-day event off the weekend (Saturday and Sunday go to Monday). */
function workday(day: number): number {
	const w = weekday(day);
	return w === 6 ? day + 2 : w === 0 ? day + 1 : day;
}

// Quantise at the gauge's resolution. Dividing an integer by a power of ten gives the double
// nearest the decimal, the same value PostgreSQL parses from the text.
const q3 = (x: number) => Math.round(x * 1000) / 1000;
const q2 = (x: number) => Math.round(x * 100) / 100;
const q1 = (x: number) => Math.round(x * 10) / 10;
const qHalf = (x: number) => Math.round(x * 2) / 2;
const um = (x: number) => Math.round(x * 1000);
const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));
const fmt3 = (x: number) => x.toFixed(3);
const fmt2 = (x: number) => x.toFixed(2);

// ---------------------------------------------------------------------------------------------
// Sign-ins and tokens (cheap: `npm start` prints them without generating the history)

function shopSlug(t: ShopTemplate, suffix: string): string {
	return suffix ? `${t.slug}-${suffix}` : t.slug;
}
function tokenOf(seed: number, email: string): string {
	return 'lmk_' + createHash('sha256').update(`${seed}|api-token|${email}`).digest('base64url').slice(0, 40);
}

function normalise(opts: DemoOptions): Required<DemoOptions> {
	const o: Required<DemoOptions> = {
		seed: opts.seed ?? 20261201,
		endDate: opts.endDate,
		shops: opts.shops ?? 2,
		headsTotal: opts.headsTotal ?? 3000,
		months: opts.months ?? 24,
		slugSuffix: opts.slugSuffix ?? ''
	};
	if (!Number.isInteger(o.seed)) throw new RangeError('seed must be an integer');
	if (!Number.isInteger(o.shops) || o.shops < 1 || o.shops > SHOP_TEMPLATES.length)
		throw new RangeError(`shops must be 1..${SHOP_TEMPLATES.length}`);
	if (!Number.isInteger(o.headsTotal) || o.headsTotal < 0) throw new RangeError('headsTotal must be a whole number');
	if (!(o.months > 0 && o.months <= 240)) throw new RangeError('months must be in 1..240');
	if (o.slugSuffix && !/^[a-z0-9][a-z0-9-]{0,40}$/.test(o.slugSuffix))
		throw new RangeError('slugSuffix must be lowercase letters, digits and hyphens');
	dayOf(o.endDate);
	return o;
}

/** The demo sign-ins for these options, without generating any history. */
export function demoSignIns(opts: Omit<DemoOptions, 'endDate'> & { endDate?: string } = {}): DemoSignIn[] {
	const o = normalise({ ...opts, endDate: opts.endDate ?? '2000-01-01' });
	const out: DemoSignIn[] = [];
	for (const t of SHOP_TEMPLATES.slice(0, o.shops)) {
		const slug = shopSlug(t, o.slugSuffix);
		for (const role of ['owner', 'engineer', 'machinist', 'viewer'] as const) {
			const email = `${role}@${slug}.example`;
			out.push({
				email,
				password: `${slug}-${role}-demo`,
				role,
				shop: slug,
				shopName: t.name,
				name: t.users[role],
				token: tokenOf(o.seed, email)
			});
		}
	}
	return out;
}

// ---------------------------------------------------------------------------------------------
// The simulation

interface LimitVersion {
	from: number;
	min: number | null;
	max: number | null;
}
type LimitIndex = Map<string, LimitVersion[]>;
const limitKey = (familyId: string, m: Measurement, side: Side, stage: Stage) => `${familyId}|${m}|${side}|${stage}`;

function limitAt(index: LimitIndex, familyId: string, m: Measurement, side: Side, stage: Stage, day: number) {
	const versions = index.get(limitKey(familyId, m, side, stage));
	if (!versions) return null;
	let hit: LimitVersion | null = null;
	for (const v of versions) if (v.from <= day && (!hit || v.from > hit.from)) hit = v;
	return hit;
}

interface Machinist {
	name: string;
	/** Offset and spread of the bores this person reams (mm), and lapping finish factor. */
	boreBias: number;
	boreSd: number;
	raFactor: number;
}

interface AsReceived {
	stem: number;
	bore: number;
	clr: number;
	face: number;
	seat: number;
	width: number;
	margin: number;
}
interface Final {
	stem: number;
	bore: number;
	clr: number;
	seat: number;
	width: number;
	ra: number;
	vac: number;
	fluid: number;
	/** First (failed) seal test results when the valve was re-lapped and retested. */
	vacFirst: number | null;
	fluidFirst: number | null;
}
interface Position {
	cylinder: number;
	side: Side;
	valve: number;
	ar: AsReceived;
	arAt: string;
	fin: Final | null;
	finAt: string;
	retestAt: string;
	kind: DecisionKind | null;
}
interface HeadPlan {
	row: HeadRow;
	arBy: string;
	finalBy: string;
	positions: Position[];
}

interface ShopContext {
	t: ShopTemplate;
	shop: ShopRow;
	families: { t: FamilyTemplate; row: FamilyRow }[];
	limits: LimitIndex;
	instrumentFor: Map<Measurement, string>;
	machinists: Machinist[];
	users: Record<Role, string>;
	tightenDay: number | null;
	limitCache: Map<string, SideLimits>;
}

interface Outcome {
	suggested: DecisionKind;
	rule: string;
	guide: 'replace' | 'knurl' | null;
	valve: boolean;
	seat: boolean;
}

interface SideLimits {
	clrService: number;
	clrRework: number;
	stemMin: number;
	marginMin: number;
	faceMax: number;
	seatMax: number;
	widthMin: number | null;
	widthMax: number | null;
}

/** The as-received and rework limits in effect for a family side on a day, memoised per day. */
function sideLimits(ctx: ShopContext, familyId: string, side: Side, day: number): SideLimits {
	const key = `${familyId}|${side}|${day}`;
	const hit = ctx.limitCache.get(key);
	if (hit) return hit;
	const lim = (m: Measurement, stage: Stage = 'as_received') => limitAt(ctx.limits, familyId, m, side, stage, day);
	const width = lim('seat_width');
	const out: SideLimits = {
		clrService: lim('clearance')?.max ?? CLEARANCE_SERVICE_MAX[side],
		clrRework: lim('clearance', 'final')?.max ?? CLEARANCE_NEW[side][1],
		stemMin: lim('stem_diameter')?.min ?? 0,
		marginMin: lim('margin')?.min ?? 0,
		faceMax: lim('face_runout')?.max ?? Infinity,
		seatMax: lim('seat_runout')?.max ?? Infinity,
		widthMin: width?.min ?? null,
		widthMax: width?.max ?? null
	};
	ctx.limitCache.set(key, out);
	return out;
}

/** The suggested decision for one position, from its as-received readings and the limits of the day. */
function judge(ctx: ShopContext, familyId: string, side: Side, ar: AsReceived, day: number, mileageKm: number): Outcome {
	const { clrService, clrRework, stemMin, marginMin, faceMax, seatMax, widthMin, widthMax } = sideLimits(ctx, familyId, side, day);

	// Guides come first: every seat cut pilots off the guide.
	let guide: Outcome['guide'] = null;
	let rule = '';
	if (ar.clr > clrService) {
		guide = 'replace';
		rule = `clearance ${fmt3(ar.clr)} > service max ${fmt3(clrService)} mm`;
	} else if (ar.clr > clrRework) {
		// Within the service limit but looser than the rework spec: knurl and ream back to size.
		guide = 'knurl';
		rule = `clearance ${fmt3(ar.clr)} > rework max ${fmt3(clrRework)} mm, within service max`;
	}
	const valveReasons: string[] = [];
	if (ar.stem < stemMin) valveReasons.push(`stem ${fmt3(ar.stem)} < min ${fmt3(stemMin)} mm`);
	if (ar.margin < marginMin) valveReasons.push(`margin ${fmt2(ar.margin)} < min ${fmt2(marginMin)} mm`);
	if (ar.face > faceMax) valveReasons.push(`face runout ${fmt3(ar.face)} > max ${fmt3(faceMax)} mm`);
	const seatReasons: string[] = [];
	if (ar.seat > seatMax) seatReasons.push(`seat runout ${fmt3(ar.seat)} > max ${fmt3(seatMax)} mm`);
	if ((widthMin != null && ar.width < widthMin) || (widthMax != null && ar.width > widthMax))
		seatReasons.push(`seat width ${fmt2(ar.width)} outside ${fmt2(widthMin ?? 0)}–${fmt2(widthMax ?? 0)} mm`);

	let suggested: DecisionKind;
	if (guide === 'replace') {
		suggested = 'replace_guide';
	} else if (valveReasons.length) {
		suggested = 'replace_valve';
		rule = valveReasons[0];
	} else if (guide === 'knurl') {
		suggested = 'knurl_guide';
	} else if (seatReasons.length) {
		suggested = 'recut_seat';
		rule = seatReasons[0];
	} else if (mileageKm < 90_000 && ar.seat <= 0.02 && ar.clr <= clrRework * 0.8) {
		suggested = 'reuse';
		rule = 'all readings well inside limits';
	} else {
		suggested = 'lap';
		rule = 'within limits';
	}
	return { suggested, rule, guide, valve: valveReasons.length > 0, seat: seatReasons.length > 0 };
}

const OVERRIDES: Partial<Record<DecisionKind, { kind: DecisionKind; note: string }[]>> = {
	lap: [
		{ kind: 'reface_valve', note: 'Light pitting on the face; refaced before lapping' },
		{ kind: 'reuse', note: 'Customer asked for no work on this position' }
	],
	recut_seat: [{ kind: 'replace_seat', note: 'Seat insert loose in the head; replaced' }],
	replace_valve: [{ kind: 'reface_valve', note: 'Valve on back order; refaced, margin checked by hand' }],
	knurl_guide: [{ kind: 'replace_guide', note: 'Guide cracked at the top; replaced instead of knurling' }],
	replace_guide: [{ kind: 'knurl_guide', note: 'Customer declined new guides; knurled and reamed' }]
};

interface BuildState {
	seed: number;
	endDay: number;
	decisions: DecisionRow[];
	leakage: LeakageRow[];
	readingCount: number;
}

interface HeadInput {
	rng: Rng;
	fam: { t: FamilyTemplate; row: FamilyRow };
	serial: string;
	customer: string;
	receivedDay: number;
	mileageKm: number;
	complaint: string;
	comebackOf: HeadPlan | null;
}

function simulateHead(ctx: ShopContext, st: BuildState, h: HeadInput): HeadPlan {
	const { rng, fam } = h;
	const shopId = ctx.shop.id;
	const id = uuidOf(st.seed, `head|${ctx.shop.slug}|${h.serial}`);

	// Job timeline: inspection a few days after arrival, decisions within a few days, rework
	// (longer on diesels, waiting for parts), final check, release when the customer collects.
	// Events with a time stamp end the day before endDate.
	const inspectDay = workday(h.receivedDay + rng.int(1, 4));
	const reworkDay = workday(inspectDay + rng.int(1, 3));
	const finalDay = workday(reworkDay + rng.int(3, 12) + (fam.t.diesel ? 3 : 0));
	const releaseDay = workday(finalDay + rng.int(1, 4));
	const lastStamped = st.endDay - 1;
	let status: HeadStatus = 'received';
	if (releaseDay <= st.endDay) status = 'released';
	else if (finalDay <= lastStamped) status = 'final_check';
	else if (reworkDay <= lastStamped) status = 'in_rework';
	else if (inspectDay <= lastStamped) status = 'inspected';

	const people = ctx.machinists;
	const arBy = rng.pick(people);
	const finalBy = rng.chance(0.7) ? arBy : rng.pick(people);
	const customerSlug = h.customer.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');
	const row: HeadRow = {
		id,
		shopId,
		familyId: fam.row.id,
		serial: h.serial,
		customer: h.customer,
		customerEmail: rng.chance(0.6) ? `service@${customerSlug}.example` : null,
		receivedOn: dateOf(h.receivedDay),
		releasedOn: status === 'released' ? dateOf(releaseDay) : null,
		mileageKm: h.mileageKm,
		engineHours: null,
		complaint: h.complaint,
		status,
		comebackOf: h.comebackOf?.row.id ?? null
	};
	const plan: HeadPlan = { row, arBy: arBy.name, finalBy: finalBy.name, positions: [] };

	// Wear grows a little faster than mileage; a head's history (oil, service) scales all its
	// positions together, and each position varies on its own. Comebacks start from the rework.
	const mk = h.comebackOf ? (h.mileageKm - (h.comebackOf.row.mileageKm ?? 0)) / 100_000 : h.mileageKm / 100_000;
	const headFactor = rng.ln(0.3);
	const priorGrind = !h.comebackOf && rng.chance(0.2);
	const defect = h.comebackOf ? rng.int(0, 1_000_000) : -1;

	const positions: { cylinder: number; side: Side; valve: number }[] = [];
	for (let c = 1; c <= fam.t.cylinders; c++) {
		for (let v = 1; v <= fam.t.intakeValves; v++) positions.push({ cylinder: c, side: 'intake', valve: v });
		for (let v = 1; v <= fam.t.exhaustValves; v++) positions.push({ cylinder: c, side: 'exhaust', valve: v });
	}
	const defectIndex = defect >= 0 ? defect % positions.length : -1;
	const hasAr = status !== 'received';
	const hasDecision = status === 'in_rework' || status === 'final_check' || status === 'released';
	const hasFinal = status === 'final_check' || status === 'released';
	const arStart = 7 * 3600 + rng.int(0, 6 * 3600);
	const finStart = 7 * 3600 + rng.int(0, 6 * 3600);

	positions.forEach((p, i) => {
		const nominal = p.side === 'intake' ? fam.t.intakeStemMm : fam.t.exhaustStemMm;
		const exhaust = p.side === 'exhaust';
		const original = h.comebackOf?.positions[i];
		// Knurled guides are a short-term repair: they loosen again quickly.
		const knurled = original?.kind === 'knurl_guide';
		const guideWear =
			0.0068 * (exhaust ? 1.6 : 1) * fam.t.wear * headFactor * rng.ln(0.45) * Math.pow(Math.max(mk, 0), 1.1) * (knurled ? 4 : 1);
		const seatWear = 0.045 * (exhaust ? 1.4 : 1) * Math.sqrt(fam.t.wear) * headFactor * rng.ln(0.5) * Math.max(mk, 0);

		let stemUm = um(nominal - STEM_OFFSET[p.side] + rng.n(0, 0.003) - guideWear * (exhaust ? 0.14 : 0.1));
		let boreUm = um(nominal + 0.01 + rng.n(0, 0.003) + guideWear);
		let face = Math.abs(rng.n(0.008, 0.006)) + 0.05 * seatWear;
		let seat = 0.006 + 0.28 * guideWear + Math.abs(rng.n(0, 0.007)) + (exhaust ? Math.abs(rng.n(0, 0.005)) : 0);
		let width = (exhaust ? 1.82 : 1.28) + rng.n(0, 0.07) + seatWear * 1.1;
		let margin = (exhaust ? 1.55 : 1.35) + rng.n(0, 0.07) - seatWear * (exhaust ? 0.8 : 0.6) - (priorGrind ? 0.25 : 0);

		// A handful of gross outliers: a cracked guide, a bent valve, a loose seat insert.
		const r = rng.u();
		if (r < 0.0006) boreUm += um(rng.range(0.25, 0.5));
		else if (r < 0.0012) face = rng.range(0.3, 0.9);
		else if (r < 0.0018) seat = rng.range(0.2, 0.6);
		if (i === defectIndex) {
			if (rng.chance(0.5)) seat = rng.range(0.07, 0.14);
			else boreUm += um(rng.range(0.06, 0.12));
		}
		// Keep the as-received clearance within the schema's plausible range.
		boreUm = Math.min(boreUm, stemUm + 950);
		const ar: AsReceived = {
			stem: stemUm / 1000,
			bore: boreUm / 1000,
			clr: (boreUm - stemUm) / 1000,
			face: q3(clamp(face, 0, 1.9)),
			seat: q3(clamp(seat, 0.001, 1.9)),
			width: q2(clamp(width, 0.6, 4)),
			margin: q2(clamp(margin, 0.3, 3))
		};
		const pos: Position = {
			cylinder: p.cylinder,
			side: p.side,
			valve: p.valve,
			ar,
			arAt: stampOf(inspectDay, arStart + i * 45),
			fin: null,
			finAt: '',
			retestAt: '',
			kind: null
		};
		plan.positions.push(pos);
		if (!hasAr) return;
		st.readingCount += AR_MEASUREMENTS.length;
		if (!hasDecision) return;

		const outcome = judge(ctx, fam.row.id, p.side, ar, inspectDay, h.mileageKm);
		let kind = outcome.suggested;
		let note = '';
		let decidedBy = ctx.users.machinist;
		const alternatives = OVERRIDES[kind];
		if (alternatives && rng.chance(0.012)) {
			const alt = rng.pick(alternatives);
			kind = alt.kind;
			note = alt.note;
			decidedBy = ctx.users.engineer;
		}
		pos.kind = kind;
		st.decisions.push({
			id: uuidOf(st.seed, `decision|${id}|${p.cylinder}|${p.side}|${p.valve}`),
			shopId,
			headId: id,
			cylinder: p.cylinder,
			side: p.side,
			valve: p.valve,
			suggested: outcome.suggested,
			rule: outcome.rule,
			kind,
			note,
			decidedBy,
			decidedAt: stampOf(reworkDay, 7 * 3600 + 1800 + i * 20)
		});
		if (!hasFinal) return;

		// Rework: every needed repair is done, the decision records the main one.
		const guideWork = kind === 'replace_guide' || kind === 'knurl_guide' || (outcome.guide !== null && kind !== 'reuse');
		const newValve = kind === 'replace_valve' || (outcome.valve && kind !== 'reface_valve' && kind !== 'reuse');
		const seatWork = guideWork || outcome.seat || kind === 'recut_seat' || kind === 'replace_seat';
		const fStemUm = newValve ? um(nominal - STEM_OFFSET[p.side] + rng.n(0, 0.002)) : stemUm + rng.int(-1, 1);
		let fBoreUm = guideWork
			? um(nominal + 0.01 + finalBy.boreBias + rng.n(0, finalBy.boreSd))
			: boreUm + rng.int(-1, 1);
		// A bore never ends up tighter than the stem it has to take.
		fBoreUm = Math.max(fBoreUm, fStemUm + 12);
		const fSeat = seatWork ? 0.004 + Math.abs(rng.n(0.006, 0.005)) : ar.seat;
		const fWidth = seatWork ? (exhaust ? 1.8 : 1.28) + rng.n(0, 0.08) : ar.width + rng.range(0, 0.04);
		const ra = clamp(0.13 * finalBy.raFactor * rng.ln(0.3), 0.03, 2);
		const leaky = rng.chance(0.025);
		const fin: Final = {
			stem: fStemUm / 1000,
			bore: fBoreUm / 1000,
			clr: (fBoreUm - fStemUm) / 1000,
			seat: q3(clamp(fSeat, 0.001, 1.9)),
			width: q2(clamp(fWidth, 0.6, 4)),
			ra: q2(ra),
			vac: qHalf(clamp(100 - Math.abs(rng.n(0, 2.2)), 91, 100)),
			fluid: 120,
			vacFirst: leaky ? qHalf(rng.range(70, 88.5)) : null,
			fluidFirst: leaky ? rng.int(15, 110) : null
		};
		pos.fin = fin;
		pos.finAt = stampOf(finalDay, finStart + i * 50);
		if (leaky) pos.retestAt = stampOf(finalDay, finStart + i * 50 + rng.int(35, 90) * 60);
		st.readingCount += FINAL_MEASUREMENTS.length + (leaky ? 2 : 0);
	});

	// In-vehicle leak-down for about a fifth of the jobs: the worst position of a cylinder
	// decides how much it leaks and where the air is heard.
	if (rng.chance(0.2)) {
		const coolant = /coolant|gasket/i.test(h.complaint) && rng.chance(0.6);
		const coolantCyl = rng.int(1, fam.t.cylinders);
		for (let c = 1; c <= fam.t.cylinders; c++) {
			const cyl = plan.positions.filter((p) => p.cylinder === c);
			let worst: Position | null = null;
			let badness = 0;
			for (const p of cyl) {
				const b = Math.max(p.ar.seat / 0.05, p.ar.face / 0.04, (p.side === 'exhaust' ? 1.0 : 0.8) / Math.max(p.ar.margin, 0.3));
				if (b > badness) {
					badness = b;
					worst = p;
				}
			}
			let pct = clamp(rng.n(6, 2.5), 1, 10);
			let path: LeakPath = 'none';
			if (coolant && c === coolantCyl) {
				pct = rng.range(15, 35);
				path = 'coolant';
			} else if (badness > 1 && worst) {
				pct = clamp(8 + 14 * (badness - 1) + rng.n(0, 4), 11, 85);
				path = worst.side;
			} else if (rng.chance(0.08)) {
				pct = rng.range(12, 28);
				path = 'crankcase';
			}
			const withGauge = rng.chance(0.85);
			// Differential gauge: leakage % = (in − held) / in × 100, from the gauge readings.
			const pin = withGauge ? 690 : null;
			const held = pin != null ? Math.round(pin * (1 - pct / 100)) : null;
			const leakagePct = pin != null && held != null ? q1(((pin - held) / pin) * 100) : q1(pct);
			st.leakage.push({
				id: uuidOf(st.seed, `leak|${id}|${c}`),
				shopId,
				headId: id,
				cylinder: c,
				leakagePct,
				pressureInKpa: pin,
				pressureHeldKpa: held,
				leakPath: path
			});
		}
	}
	return plan;
}

function* readingsOf(ctx: ShopContext, plan: HeadPlan): Generator<ReadingRow> {
	const { row } = plan;
	if (row.status === 'received') return;
	const inst = ctx.instrumentFor;
	// Plain object literals of one shape: cheaper to build than spreads, a million times over.
	const make = (p: Position, stage: Stage, measurement: Measurement, value: number, measuredAt: string, measuredBy: string): ReadingRow => ({
		shopId: row.shopId,
		headId: row.id,
		familyId: row.familyId,
		stage,
		cylinder: p.cylinder,
		side: p.side,
		valve: p.valve,
		measurement,
		value,
		measuredAt,
		measuredBy,
		instrumentId: inst.get(measurement) ?? null
	});
	for (const p of plan.positions) {
		const ar = p.ar;
		const at = p.arAt;
		const by = plan.arBy;
		yield make(p, 'as_received', 'stem_diameter', ar.stem, at, by);
		yield make(p, 'as_received', 'guide_bore', ar.bore, at, by);
		yield make(p, 'as_received', 'clearance', ar.clr, at, by);
		yield make(p, 'as_received', 'face_runout', ar.face, at, by);
		yield make(p, 'as_received', 'seat_runout', ar.seat, at, by);
		yield make(p, 'as_received', 'seat_width', ar.width, at, by);
		yield make(p, 'as_received', 'margin', ar.margin, at, by);
		const f = p.fin;
		if (!f) continue;
		const ft = p.finAt;
		const fb = plan.finalBy;
		yield make(p, 'final', 'stem_diameter', f.stem, ft, fb);
		yield make(p, 'final', 'guide_bore', f.bore, ft, fb);
		yield make(p, 'final', 'clearance', f.clr, ft, fb);
		yield make(p, 'final', 'seat_runout', f.seat, ft, fb);
		yield make(p, 'final', 'seat_width', f.width, ft, fb);
		yield make(p, 'final', 'roughness_ra', f.ra, ft, fb);
		yield make(p, 'final', 'vacuum_hold', f.vacFirst ?? f.vac, ft, fb);
		yield make(p, 'final', 'fluid_hold', f.fluidFirst ?? f.fluid, ft, fb);
		if (f.vacFirst != null) {
			// The valve was lapped again and passed on the retest.
			yield make(p, 'final', 'vacuum_hold', f.vac, p.retestAt, fb);
			yield make(p, 'final', 'fluid_hold', f.fluid, p.retestAt, fb);
		}
	}
}

function limitRowsFor(seed: number, ctx: ShopContext, fam: FamilyRow, fromDay: number): LimitRow[] {
	const out: LimitRow[] = [];
	const add = (m: Measurement, side: Side, stage: Stage, min: number | null, max: number | null, from: number, note: string) => {
		const effectiveFrom = dateOf(from);
		out.push({
			id: uuidOf(seed, `limit|${fam.id}|${m}|${side}|${stage}|${effectiveFrom}`),
			shopId: fam.shopId,
			familyId: fam.id,
			measurement: m,
			side,
			stage,
			min,
			max,
			effectiveFrom,
			note,
			createdBy: ctx.users.engineer
		});
	};
	for (const side of ['intake', 'exhaust'] as const) {
		const nominal = side === 'intake' ? fam.intakeStemMm : fam.exhaustStemMm;
		const newStem = nominal - STEM_OFFSET[side];
		const n = 'Service limits';
		add('stem_diameter', side, 'as_received', q3(newStem - 0.025), null, fromDay, n);
		add('guide_bore', side, 'as_received', null, q3(nominal + 0.075), fromDay, n);
		add('clearance', side, 'as_received', null, CLEARANCE_SERVICE_MAX[side], fromDay, n);
		add('face_runout', side, 'as_received', null, 0.04, fromDay, n);
		add('seat_runout', side, 'as_received', null, 0.05, fromDay, n);
		add('seat_width', side, 'as_received', SEAT_WIDTH[side][0], SEAT_WIDTH[side][1], fromDay, n);
		add('margin', side, 'as_received', MARGIN_MIN[side], null, fromDay, n);
		const r = 'Rework spec';
		add('stem_diameter', side, 'final', q3(newStem - 0.025), q3(newStem + 0.015), fromDay, r);
		add('guide_bore', side, 'final', q3(nominal), q3(nominal + 0.045), fromDay, r);
		add('clearance', side, 'final', CLEARANCE_NEW[side][0], CLEARANCE_NEW[side][1], fromDay, r);
		add('seat_runout', side, 'final', null, 0.05, fromDay, r);
		add('seat_width', side, 'final', SEAT_WIDTH[side][0], SEAT_WIDTH[side][1], fromDay, r);
		add('roughness_ra', side, 'final', null, 0.25, fromDay, r);
		add('vacuum_hold', side, 'final', ctx.shop.settings.vacuumHoldPassPct, null, fromDay, r);
		add('fluid_hold', side, 'final', ctx.shop.settings.fluidHoldPassSeconds, null, fromDay, r);
		if (ctx.tightenDay != null && ctx.t.tightened === fam.code) {
			// A second, tighter version: old readings stay judged by the limits of their day.
			const t = 'Tightened after a run of comebacks';
			add('clearance', side, 'as_received', null, side === 'intake' ? 0.09 : 0.1, ctx.tightenDay, t);
			add('seat_runout', side, 'as_received', null, 0.04, ctx.tightenDay, t);
		}
	}
	return out;
}

/** Builds the whole demo. Pure: the same options give the same objects, in the same order. */
export function generateDemo(options: DemoOptions): DemoData {
	const o = normalise(options);
	const seed = o.seed;
	const endDay = dayOf(o.endDate);
	const spanDays = Math.round(o.months * 30.4375);
	const startDay = endDay - spanDays;
	const signIns = demoSignIns(o);

	const shops: ShopRow[] = [];
	const users: UserRow[] = [];
	const memberships: MembershipRow[] = [];
	const families: FamilyRow[] = [];
	const limits: LimitRow[] = [];
	const instruments: InstrumentRow[] = [];
	const apiTokens: ApiTokenRow[] = [];
	const heads: HeadRow[] = [];
	const st: BuildState = { seed, endDay, decisions: [], leakage: [], readingCount: 0 };
	const plansByShop = new Map<string, { ctx: ShopContext; plans: HeadPlan[] }>();

	const templates = SHOP_TEMPLATES.slice(0, o.shops);
	const shares = o.shops === 1 ? [1] : [0.6, 0.4];
	let assigned = 0;

	templates.forEach((t, si) => {
		const slug = shopSlug(t, o.slugSuffix);
		const shopRng = new Rng(mix(seed, 'shop', si));
		const shop: ShopRow = { id: uuidOf(seed, `shop|${slug}`), name: t.name, slug, settings: { ...t.settings } };
		shops.push(shop);

		const roleUsers = {} as Record<Role, string>;
		for (const s of signIns.filter((x) => x.shop === slug)) {
			const userId = uuidOf(seed, `user|${s.email}`);
			roleUsers[s.role] = userId;
			users.push({ id: userId, name: s.name, email: s.email, emailVerified: stampOf(startDay - 30, 9 * 3600) });
			memberships.push({ shopId: shop.id, userId, role: s.role });
			apiTokens.push({
				id: uuidOf(seed, `token|${s.email}`),
				shopId: shop.id,
				userId,
				name: 'Demo token',
				prefix: s.token.slice(0, 12),
				tokenHash: createHash('sha256').update(s.token).digest('hex'),
				role: s.role
			});
		}

		const instrumentFor = new Map<Measurement, string>();
		const byKind = new Map<string, string>();
		for (const it of INSTRUMENTS) {
			const id = uuidOf(seed, `instrument|${slug}|${it.code}`);
			byKind.set(it.kind, id);
			// The overdue gauge was last calibrated a little over one interval ago.
			const age = it.kind === t.overdue ? it.intervalDays + shopRng.int(20, 45) : shopRng.int(10, it.intervalDays - 20);
			instruments.push({
				id,
				shopId: shop.id,
				name: it.name,
				kind: it.kind,
				serial: `${t.serialPrefix}-${it.code}-01`,
				resolutionMm: it.resolutionMm,
				calibratedOn: dateOf(endDay - age),
				intervalDays: it.intervalDays,
				retired: false
			});
		}
		for (const [m, kind] of Object.entries(INSTRUMENT_FOR)) instrumentFor.set(m as Measurement, byKind.get(kind)!);

		const machinists: Machinist[] = [t.users.machinist, ...t.machinists].map((name, i) => ({
			name,
			// One person reams a touch large and less evenly: it shows on the control charts.
			boreBias: i === 2 ? 0.004 : shopRng.n(0, 0.0008),
			boreSd: i === 2 ? 0.0045 : 0.0028,
			raFactor: i === 3 ? 1.35 : 1
		}));

		const ctx: ShopContext = {
			t,
			shop,
			families: [],
			limits: new Map(),
			instrumentFor,
			machinists,
			users: roleUsers,
			tightenDay: t.tightened ? endDay - 365 : null,
			limitCache: new Map()
		};
		for (const ft of t.families) {
			const row: FamilyRow = {
				id: uuidOf(seed, `family|${slug}|${ft.code}`),
				shopId: shop.id,
				code: ft.code,
				description: ft.description,
				cylinders: ft.cylinders,
				intakeValves: ft.intakeValves,
				exhaustValves: ft.exhaustValves,
				intakeStemMm: ft.intakeStemMm,
				exhaustStemMm: ft.exhaustStemMm
			};
			families.push(row);
			ctx.families.push({ t: ft, row });
			for (const l of limitRowsFor(seed, ctx, row, startDay - 30)) {
				limits.push(l);
				const key = limitKey(l.familyId, l.measurement, l.side, l.stage);
				const list = ctx.limits.get(key) ?? [];
				list.push({ from: dayOf(l.effectiveFrom), min: l.min, max: l.max });
				ctx.limits.set(key, list);
			}
		}

		// Arrival days: slowly growing business, few heads arrive at the weekend.
		const count = si === templates.length - 1 ? o.headsTotal - assigned : Math.round(o.headsTotal * shares[si]);
		assigned += count;
		const days: number[] = [];
		for (let i = 0; i < count; i++) {
			let d = startDay + Math.floor(Math.pow(shopRng.u(), 0.85) * (spanDays + 1));
			if ((weekday(d) === 0 || weekday(d) === 6) && shopRng.chance(0.85)) d = workday(d);
			days.push(Math.min(d, endDay));
		}
		days.sort((a, b) => a - b);

		const plans: HeadPlan[] = [];
		const comebacks: HeadPlan[] = [];
		days.forEach((day, i) => {
			const rng = new Rng(mix(seed, slug, 'head', i));
			const fam = rng.weighted(ctx.families.map((f) => ({ ...f, weight: f.t.weight })));
			const u = rng.u();
			const mileage = Math.round(40_000 + 410_000 * Math.pow(u, fam.t.diesel ? 0.8 : 1.3));
			const yy = dateOf(day).slice(2, 4);
			const serial = `${fam.t.prefix}${yy}-${String(i + 1).padStart(5, '0')}`;
			const plan = simulateHead(ctx, st, {
				rng,
				fam,
				serial,
				customer: rng.pick(t.customers),
				receivedDay: day,
				mileageKm: mileage,
				complaint: rng.pick(COMPLAINTS),
				comebackOf: null
			});
			plans.push(plan);

			// Comebacks: more for the families that wear worse and after knurled guides; fewer for
			// the family whose limits were tightened, once the new limits apply.
			if (plan.row.status !== 'released') return;
			const cbRng = new Rng(mix(seed, slug, 'comeback', i));
			let p = 0.006 * (fam.t.wear > 1.5 ? 3.2 : 1);
			if (plan.positions.some((x) => x.kind === 'knurl_guide')) p *= 1.8;
			if (ctx.tightenDay != null && t.tightened === fam.t.code && day >= ctx.tightenDay) p *= 0.4;
			if (!cbRng.chance(p)) return;
			const back = dayOf(plan.row.releasedOn!) + 10 + Math.round(-60 * Math.log(1 - cbRng.u()));
			if (back > endDay) return;
			comebacks.push(
				simulateHead(ctx, st, {
					rng: cbRng,
					fam,
					serial: `${serial}-C1`,
					customer: plan.row.customer,
					receivedDay: workday(back) > endDay ? back : workday(back),
					mileageKm: mileage + cbRng.int(1_500, 25_000),
					complaint: cbRng.pick(COMEBACK_COMPLAINTS),
					comebackOf: plan
				})
			);
		});
		const all = [...plans, ...comebacks].sort(
			(a, b) => (a.row.receivedOn < b.row.receivedOn ? -1 : a.row.receivedOn > b.row.receivedOn ? 1 : a.row.serial < b.row.serial ? -1 : 1)
		);
		for (const p of all) heads.push(p.row);
		plansByShop.set(shop.id, { ctx, plans: all });
	});

	function* readings(shopId?: string): Generator<ReadingRow> {
		for (const [id, { ctx, plans }] of plansByShop) {
			if (shopId && id !== shopId) continue;
			for (const plan of plans) yield* readingsOf(ctx, plan);
		}
	}

	return {
		options: o,
		shops,
		users,
		memberships,
		families,
		limits,
		instruments,
		apiTokens,
		heads,
		decisions: st.decisions,
		cylinderLeakage: st.leakage,
		readings,
		counts: {
			shops: shops.length,
			users: users.length,
			memberships: memberships.length,
			families: families.length,
			limits: limits.length,
			instruments: instruments.length,
			apiTokens: apiTokens.length,
			heads: heads.length,
			readings: st.readingCount,
			decisions: st.decisions.length,
			cylinderLeakage: st.leakage.length
		},
		signIns
	};
}
