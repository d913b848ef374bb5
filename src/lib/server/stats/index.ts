// Public API of the statistics layer: pure functions over number[] / Float64Array.
export type { Values } from './input';
export {
	addValue,
	describe,
	emptyMoments,
	histogramSorted,
	lag1Autocorrelation,
	MAD_SCALE,
	mergeMoments,
	momentsOf,
	momentsToSummary,
	quantileType7,
	TUKEY_K,
	type Fences,
	type HistogramBin,
	type Moments,
	type MomentsSummary,
	type Quantiles,
	type Summary
} from './summary';
export {
	MODIFIED_Z_FACTOR,
	MODIFIED_Z_THRESHOLD,
	modifiedZ,
	outlierReasons,
	percentileRank,
	tukeyFlag,
	type OutlierCode,
	type OutlierInput,
	type OutlierReason
} from './robust';
export {
	chiSquare2x2,
	chiSquareTest,
	compareProportions,
	fisherExact2x2,
	mnDifference,
	mnStatistic,
	newcombeDifference,
	P_FLOOR,
	restrictedMle,
	wilson,
	Z95,
	type ChiSquareResult,
	type DifferenceInterval,
	type FisherResult,
	type ProportionComparison,
	type ScoreDifference,
	type Table2x2,
	type WilsonInterval
} from './rates';
export {
	averageMovingRange,
	bissellInterval,
	CAPABLE_CPK,
	capability,
	capabilityLevel,
	capabilityIndices,
	capabilityVerdict,
	CONTROL_CHART_CONSTANTS,
	D2_MR,
	D4_MR,
	E2_MR,
	MARGINAL_CPK,
	type CapabilityIndices,
	type CapabilityLevel,
	type CapabilityResult,
	type CapabilityVerdict,
	type SpecLimits
} from './capability';
export {
	baselineFigures,
	clippedLimits,
	controlChart,
	ewmaChart,
	pChart,
	pChartLimits,
	sigmaFromMrBar,
	EWMA_L,
	EWMA_LAMBDA,
	type BaselineFigures,
	type ChartPoint,
	type ClippedLimits,
	type ControlChart,
	type ControlPoint,
	type EwmaChart,
	type PChartPoint
} from './control';
export { NELSON, RULE_IDS, RULES, ruleBreaks, WESTERN_ELECTRIC, type RuleBreak, type RuleId, type RuleInfo } from './rules';
export { andersonDarling, phi, phiInverse, type NormalityTest } from './normality';
export { linearFit, type BandPoint, type LinearFit } from './regression';
export {
	countBeyond,
	expandCounts,
	robustOfSorted,
	summarizeCounts,
	summarizeSorted,
	type FrequencySummary,
	type RobustSummary,
	type ValueCount
} from './frequency';
export * from './baseline';
