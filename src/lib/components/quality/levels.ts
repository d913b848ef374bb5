// How a capability level looks and reads on the quality page's panels.
import type { CapabilityResponse } from '$lib/api/stats';

type Level = CapabilityResponse['verdict']['level'];

export const LEVEL_CLASS: Record<Level, string> = {
	capable: 'border-ok bg-ok/10 text-ok',
	marginal: 'border-warn bg-warn/10 text-warn',
	not_capable: 'border-bad bg-bad/10 text-bad',
	unknown: 'border-line bg-paper text-muted'
};

export const LEVEL_WORD: Record<Level, string> = { capable: 'Holds the limits', marginal: 'Only just holds the limits', not_capable: 'Does not hold the limits', unknown: 'Cannot tell yet' };

export const METHOD_WORD: Record<CapabilityResponse['method'], string> = { normal: 'Normal method', percentile: 'Percentile method' };
