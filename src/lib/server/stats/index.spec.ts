import { describe as group, expect, it } from 'vitest';
import * as stats from './index';

group('stats index', () => {
	it('re-exports the public functions', () => {
		// API surface agreed for the statistics layer (no numeric reference needed)
		for (const name of [
			'describe',
			'quantileType7',
			'emptyMoments',
			'addValue',
			'mergeMoments',
			'momentsToSummary',
			'modifiedZ',
			'tukeyFlag',
			'percentileRank',
			'outlierReasons',
			'wilson',
			'fisherExact2x2',
			'chiSquare2x2',
			'compareProportions',
			'capability',
			'controlChart',
			'linearFit'
		] as const) {
			expect(typeof stats[name]).toBe('function');
		}
		expect(stats.CONTROL_CHART_CONSTANTS[2].d2).toBe(1.128); // REFERENCES.md B5
	});
});
