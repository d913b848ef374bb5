// What the simulation of one shop carries around: its context (people, gauges, limits in force)
// and the plan of each head, from which the readings are streamed later.
import type { Measurement, Role, Side } from '../../measurements';
import type { FamilyTemplate, ShopTemplate } from './catalogue';
import type { Rng } from './random';
import type { DecisionKind, DecisionRow, FamilyRow, HeadRow, LeakageRow, ShopRow } from './types';

export interface LimitVersion {
	from: number;
	min: number | null;
	max: number | null;
}
export type LimitIndex = Map<string, LimitVersion[]>;

export interface Machinist {
	name: string;
	/** Offset and spread of the bores this person reams (mm), and lapping finish factor. */
	boreBias: number;
	boreSd: number;
	raFactor: number;
}

export interface AsReceived {
	stem: number;
	bore: number;
	clr: number;
	face: number;
	seat: number;
	width: number;
	margin: number;
}
export interface Final {
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
export interface Position {
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
export interface HeadPlan {
	row: HeadRow;
	arBy: string;
	finalBy: string;
	positions: Position[];
}

export interface ShopContext {
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

export interface Outcome {
	suggested: DecisionKind;
	rule: string;
	guide: 'replace' | 'knurl' | null;
	valve: boolean;
	seat: boolean;
}

export interface SideLimits {
	clrService: number;
	clrRework: number;
	stemMin: number;
	marginMin: number;
	faceMax: number;
	seatMax: number;
	widthMin: number | null;
	widthMax: number | null;
}

export interface BuildState {
	seed: number;
	endDay: number;
	decisions: DecisionRow[];
	leakage: LeakageRow[];
	readingCount: number;
}

export interface HeadInput {
	rng: Rng;
	fam: { t: FamilyTemplate; row: FamilyRow };
	serial: string;
	customer: string;
	receivedDay: number;
	mileageKm: number;
	complaint: string;
	comebackOf: HeadPlan | null;
}
