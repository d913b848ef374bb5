// The statistics API's response shapes, for the charts that fetch them from the browser, and a
// helper that builds their URLs. The shapes are the contract's ($lib/contract, zod schemas that
// also generate the OpenAPI document); every number that is undefined for the data (an SD of one
// reading, a rate of zero positions) is null, never NaN.
import type { CheckResponse, ComebacksResponse, CompareResponse, ControlResponse, PChartResponse, DistributionResponse, FirstPassResponse, OutliersResponse, RatesResponse, CapabilityResponse, CapabilityMachinistsResponse, WearResponse } from '../contract';
import { getJson } from './client';

export type {
	CapabilityResponse,
	CapabilityMachinistsResponse,
	CheckResponse,
	ComebacksResponse,
	CompareResponse,
	ControlPointOut,
	ControlBaseline,
	ControlResponse,
	PChartResponse,
	DataSource,
	DescribeResponse,
	DistributionResponse,
	DistributionSummary,
	EchoFilters,
	FamilyLabel,
	FirstPassResponse,
	HistogramBin,
	LimitInfo,
	OutlierItem,
	OutlierReason,
	OutliersResponse,
	Quantiles,
	RateCell,
	RatesResponse,
	SideDifference,
	WearResponse,
	YieldCell
} from '../contract';

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
export const getFirstPass = (p: Params, f?: typeof fetch) => getJson<FirstPassResponse>(statsUrl('stats/first-pass', p), f);
export const getCapability = (p: Params, f?: typeof fetch) => getJson<CapabilityResponse>(statsUrl('stats/capability', p), f);
export const getCapabilityByMachinist = (p: Params, f?: typeof fetch) => getJson<CapabilityMachinistsResponse>(statsUrl('stats/capability/machinists', p), f);
export const getControl = (p: Params, f?: typeof fetch) => getJson<ControlResponse>(statsUrl('stats/control', p), f);
export const getPChart = (p: Params, f?: typeof fetch) => getJson<PChartResponse>(statsUrl('stats/pchart', p), f);
export const getWear = (p: Params, f?: typeof fetch) => getJson<WearResponse>(statsUrl('stats/wear', p), f);
