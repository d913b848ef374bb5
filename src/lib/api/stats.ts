// The statistics API's response shapes, for the charts that fetch them from the browser, and a
// helper that builds their URLs. Every number that is undefined for the data (an SD of one
// reading, a rate of zero positions) is null, never NaN.
import type { CanonicalUnit, Measurement, Side, Stage } from '../measurements';
import type { DecisionKindName, OutlierSort } from '../schemas/stats';
import { getJson } from './client';

export interface FamilyLabel {
	id: string;
	code: string;
}

/** The filters a response was computed for, as parsed (absent ones omitted). */
export interface EchoFilters {
	family?: string;
	side?: Side;
	stage?: Stage;
	from?: string;
	to?: string;
	machinist?: string;
	customer?: string;
	mileageMin?: number;
	mileageMax?: number;
}

/** Where the numbers came from: the per-month summaries, readings, or both (partial months). */
export type DataSource = 'summaries' | 'summaries+readings' | 'readings';

export interface Quantiles {
	p05: number | null;
	p25: number | null;
	p50: number | null;
	p75: number | null;
	p95: number | null;
}
export interface HistogramBin {
	x0: number;
	x1: number;
	count: number;
}
export interface LimitInfo {
	min: number | null;
	max: number | null;
	/** The day this version took effect. */
	effectiveFrom: string;
}

export interface DistributionSummary {
	n: number;
	mean: number | null;
	/** Sample SD (n − 1); null for n < 2. */
	sd: number | null;
	min: number | null;
	max: number | null;
	/** Hyndman & Fan type 7 (= PostgreSQL percentile_cont). */
	quantiles: Quantiles;
	iqr: number | null;
	/** Raw MAD, median |x − median|. */
	mad: number | null;
	/** 1.4826 · MAD. */
	madScaled: number | null;
	/** Tukey's inner fences Q1 − 1.5·IQR, Q3 + 1.5·IQR. */
	fences: { low: number | null; high: number | null };
	/** Readings strictly outside the fences. */
	tukeyOutside: number;
	/** Freedman–Diaconis bins, 5–60 of them. */
	histogram: HistogramBin[];
	/** The limits in force on `limitsAsOf`, when the selection is one family, side and stage. */
	limits: LimitInfo | null;
	/** Readings outside the limits in force on `limitsAsOf` of their own family × side × stage;
	 * `judged` counts the readings that had limits, `share` = (below + above) / judged. */
	outside: { below: number; above: number; judged: number; share: number | null };
}

export interface DistributionResponse extends DistributionSummary {
	measurement: Measurement;
	unit: CanonicalUnit;
	filters: EchoFilters;
	limitsAsOf: string;
	source: DataSource;
}

export interface CompareResponse {
	measurement: Measurement;
	unit: CanonicalUnit;
	filters: EchoFilters;
	limitsAsOf: string;
	source: DataSource;
	/** One entry per family with readings, sorted by median (then code). */
	families: Array<{ family: FamilyLabel } & DistributionSummary>;
}

export interface OutlierReason {
	code: 'below_limit' | 'above_limit' | 'tukey_low' | 'tukey_high' | 'modified_z';
	text: string;
}

export interface CheckResponse {
	family: FamilyLabel;
	side: Side;
	stage: Stage;
	measurement: Measurement;
	/** The value as entered, and in the canonical unit. */
	entered: { value: number; unit: string };
	value: number;
	unit: CanonicalUnit;
	limits: LimitInfo | null;
	/** null when no limits are set. */
	withinLimits: boolean | null;
	/** Which limit the value breaks. */
	broken: 'min' | 'max' | null;
	fleet: {
		n: number;
		median: number | null;
		mad: number | null;
		fences: { low: number | null; high: number | null };
	};
	/** Share of the fleet below the value, ties counted half (mid-rank), in percent. */
	percentile: number | null;
	/** Modified z-score 0.6745·(x − median)/MAD (Iglewicz & Hoaglin); null when MAD is 0. */
	robustZ: number | null;
	tukey: 'low' | 'high' | null;
	reasons: OutlierReason[];
	suggestion: { decision: DecisionKindName | null; rule: string };
	caution: string;
}

export interface OutlierItem {
	id: number;
	family: FamilyLabel;
	side: Side;
	stage: Stage;
	cylinder: number;
	valve: number;
	headId: string;
	serial: string;
	value: number;
	measuredAt: string;
	measuredBy: string;
	/** The limit version in effect on the reading's day. */
	limits: LimitInfo | null;
	modifiedZ: number | null;
	reasons: OutlierReason[];
}

export interface OutliersResponse {
	measurement: Measurement;
	unit: CanonicalUnit;
	filters: EchoFilters;
	source: DataSource;
	page: number;
	pageSize: number;
	sort: OutlierSort;
	total: number;
	pages: number;
	/** The fences, median and MAD each family × side × stage was judged by. */
	groups: Array<{
		family: FamilyLabel;
		side: Side;
		stage: Stage;
		n: number;
		median: number | null;
		mad: number | null;
		fences: { low: number | null; high: number | null };
	}>;
	items: OutlierItem[];
}

export interface RateCell {
	failures: number;
	n: number;
	/** failures / n; null when n = 0. */
	rate: number | null;
	/** 95 % Wilson score interval. */
	ci95: { low: number | null; high: number | null };
}

export interface SideDifference {
	/** Fisher's exact test when an expected count is below 5, else Pearson's chi-square. */
	test: 'fisher' | 'chi_square';
	p: number | null;
	statistic: number | null;
	df: number | null;
	minExpected: number | null;
	/** intake rate − exhaust rate, with Newcombe's hybrid score interval. */
	difference: number | null;
	ci95: { low: number | null; high: number | null };
}

export interface RatesResponse {
	check: { kind: 'measurement'; measurement: Measurement; stage: Stage } | { kind: 'decision'; decision: DecisionKindName };
	/** What n counts. */
	unit: 'valve position';
	filters: EchoFilters;
	overall: RateCell;
	bySide: Record<Side, RateCell>;
	/** null when either side has no positions. */
	sideDifference: SideDifference | null;
	families: Array<{ family: FamilyLabel; bySide: Record<Side, RateCell>; sideDifference: SideDifference | null } & RateCell>;
	/** For a heat map: family × side × cylinder. */
	byCylinder: Array<{ family: FamilyLabel; side: Side; cylinder: number } & RateCell>;
}

export interface ComebacksResponse {
	filters: EchoFilters;
	unit: 'released head';
	overall: RateCell;
	families: Array<{ family: FamilyLabel } & RateCell>;
}

export interface CapabilityResponse {
	family: FamilyLabel;
	side: Side;
	stage: 'final';
	measurement: Measurement;
	unit: CanonicalUnit;
	filters: EchoFilters;
	limits: LimitInfo | null;
	limitsAsOf: string;
	n: number;
	mean: number | null;
	/** MR̄/1.128 from consecutive readings in time order. */
	sdWithin: number | null;
	sdOverall: number | null;
	cp: number | null;
	cpk: number | null;
	cpu: number | null;
	cpl: number | null;
	pp: number | null;
	ppk: number | null;
	verdict: { level: 'capable' | 'marginal' | 'not_capable' | 'unknown'; text: string };
}

export interface ControlPointOut {
	id: number;
	t: string;
	value: number;
	mr: number | null;
	serial: string;
	measuredBy: string;
	beyond: boolean;
	mrBeyond: boolean;
}

export interface ControlResponse {
	family: FamilyLabel;
	side: Side;
	stage: Stage;
	measurement: Measurement;
	unit: CanonicalUnit;
	filters: EchoFilters;
	/** Readings in the selection; the chart holds the most recent `n` of them. */
	total: number;
	n: number;
	centre: number | null;
	ucl: number | null;
	lcl: number | null;
	mrBar: number | null;
	mrUcl: number | null;
	mrLcl: number | null;
	/** The shop's limits in force, to draw beside the control limits. */
	specLimits: LimitInfo | null;
	points: ControlPointOut[];
	beyondLimits: number[];
	mrBeyondLimits: number[];
}

export interface WearResponse {
	measurement: Measurement;
	stage: Stage;
	unit: CanonicalUnit;
	filters: EchoFilters;
	n: number;
	/** Change of the measurement per 10,000 km. */
	slopePer10000Km: number | null;
	intercept: number | null;
	r2: number | null;
	residualSd: number | null;
	slopeSePer10000Km: number | null;
	/** 95 % confidence band of the mean, at 41 mileages from the lowest to the highest. */
	band: Array<{ x: number; fit: number; low: number; high: number }>;
	/** At most 5,000 points, sampled evenly in reading order when there are more. */
	points: Array<{ mileageKm: number; value: number }>;
	sampled: boolean;
}

export interface DescribeResponse extends Omit<DistributionSummary, 'limits' | 'outside'> {
	/** NIST StRD lag-1 autocorrelation, in the order sent. */
	lag1Autocorrelation: number | null;
}

type Params = Record<string, string | number | null | undefined>;

/** `/api/v1/stats/<name>?…` with empty parameters left out. */
export function statsUrl(path: string, params: Params = {}): string {
	const q = new URLSearchParams();
	for (const [k, v] of Object.entries(params)) if (v !== null && v !== undefined && v !== '') q.set(k, String(v));
	const s = q.toString();
	return `/api/v1/${path}${s ? `?${s}` : ''}`;
}

export const getDistribution = (p: Params, f?: typeof fetch) => getJson<DistributionResponse>(statsUrl('stats/distribution', p), f);
export const getCompare = (p: Params, f?: typeof fetch) => getJson<CompareResponse>(statsUrl('stats/compare', p), f);
export const getCheck = (p: Params, f?: typeof fetch) => getJson<CheckResponse>(statsUrl('check', p), f);
export const getOutliers = (p: Params, f?: typeof fetch) => getJson<OutliersResponse>(statsUrl('stats/outliers', p), f);
export const getRates = (p: Params, f?: typeof fetch) => getJson<RatesResponse>(statsUrl('stats/rates', p), f);
export const getComebacks = (p: Params, f?: typeof fetch) => getJson<ComebacksResponse>(statsUrl('stats/comebacks', p), f);
export const getCapability = (p: Params, f?: typeof fetch) => getJson<CapabilityResponse>(statsUrl('stats/capability', p), f);
export const getControl = (p: Params, f?: typeof fetch) => getJson<ControlResponse>(statsUrl('stats/control', p), f);
export const getWear = (p: Params, f?: typeof fetch) => getJson<WearResponse>(statsUrl('stats/wear', p), f);
