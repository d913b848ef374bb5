// Run rules on sequences built to break exactly one rule each (centre 0, σ 1, so each value is
// its z). The rules as Nelson (1984) states them and as the NIST/SEMATECH e-Handbook §6.3.2
// lists the Western Electric ones (docs/REFERENCES.md B9); each sequence was checked by hand
// against every other rule: runs on one side, steps of one sign, alternation, zone counts.
import { describe as group, expect, it } from 'vitest';
import { ruleBreaks, RULE_IDS, type RuleId } from './rules';

const fired = (values: number[]) => ruleBreaks(values, 0, 1).map((b) => `${b.rule}@${b.index}`);

group('Western Electric zone rules and Nelson’s tests (Nelson 1984; NIST e-Handbook §6.3.2)', () => {
	it('a quiet sequence breaks none', () => {
		expect(fired([0.5, -0.5, 0.3, 0.6, -0.2, -0.7, 0.4, -0.3, -0.6, 0.2, 0.5, -0.4])).toEqual([]);
	});
	it('one point beyond 3σ: WE 1 = Nelson 1 only', () => {
		expect(fired([0.5, -0.5, 3.2, 0.3])).toEqual(['we1@2', 'n1@2']);
		// On the limit is not beyond it.
		expect(fired([0.5, -0.5, 3, 0.3])).toEqual([]);
		expect(fired([0.5, -0.5, -3.2, 0.3])).toEqual(['we1@2', 'n1@2']);
	});
	it('two of three beyond 2σ on one side: WE 2 = Nelson 5 only', () => {
		expect(fired([0.5, 2.5, -0.3, 2.2, 0.1])).toEqual(['we2@3', 'n5@3']);
		// On opposite sides they are not a pattern.
		expect(fired([0.5, 2.5, -0.3, -2.2, 0.1])).toEqual([]);
	});
	it('four of five beyond 1σ on one side: WE 3 = Nelson 6 only', () => {
		expect(fired([0.2, 1.5, 1.2, 0.5, 1.4, 1.3, -0.2])).toEqual(['we3@5', 'n6@5']);
	});
	it('eight in a row on one side: WE 4 only (Nelson asks for nine)', () => {
		expect(fired([0.2, 0.5, 0.3, 0.6, 0.1, 0.6, 0.4, 0.7, -0.3])).toEqual(['we4@7']);
	});
	it('nine in a row on one side: Nelson 2 (and WE 4, which it contains)', () => {
		expect(fired([0.2, 0.5, 0.3, 0.6, 0.1, 0.6, 0.4, 0.7, 0.3, -0.3])).toEqual(['we4@7', 'we4@8', 'n2@8']);
		// A point on the centre line ends a run.
		expect(fired([0.2, 0.5, 0.3, 0.6, 0, 0.6, 0.4, 0.7, 0.3, -0.3])).toEqual([]);
	});
	it('six in a row steadily increasing: Nelson 3 only', () => {
		expect(fired([-0.8, -0.5, -0.1, 0.2, 0.4, 0.9])).toEqual(['n3@5']);
		// A tie breaks the trend.
		expect(fired([-0.8, -0.5, -0.5, 0.2, 0.4, 0.9])).toEqual([]);
		expect(fired([0.9, 0.4, 0.2, -0.1, -0.5, -0.8])).toEqual(['n3@5']);
	});
	it('fourteen in a row alternating up and down: Nelson 4 only', () => {
		const alt = [0.6, -0.6, 0.7, -0.5, 0.8, -0.7, 0.5, -0.8, 0.6, -0.5, 0.7, -0.6, 0.5, -0.7];
		expect(fired(alt)).toEqual(['n4@13']);
		expect(fired(alt.slice(0, 13))).toEqual([]);
	});
	it('fifteen in a row within 1σ: Nelson 7 only', () => {
		const calm = [0.5, -0.5, 0.3, 0.6, -0.2, -0.7, 0.4, -0.3, -0.6, 0.2, 0.5, -0.4, 0.1, 0.3, -0.2];
		expect(fired(calm)).toEqual(['n7@14']);
		expect(fired(calm.slice(0, 14))).toEqual([]);
	});
	it('eight in a row beyond 1σ on either side: Nelson 8 only', () => {
		expect(fired([1.5, -1.4, -1.6, 1.3, 1.7, -1.2, 1.4, -1.5])).toEqual(['n8@7']);
	});
	it('only the rules asked for, each break with the first point of its pattern', () => {
		const v = [0.2, 0.5, 0.3, 0.6, 0.1, 0.6, 0.4, 0.7, 0.3, -0.3];
		expect(ruleBreaks(v, 0, 1, ['n2'])).toEqual([{ rule: 'n2', index: 8, from: 0 }]);
		expect(ruleBreaks([0.5, 2.5, -0.3, 2.2], 0, 1, ['we2'])).toEqual([{ rule: 'we2', index: 3, from: 1 }]);
	});
	it('centre and σ scale the zones; no σ, no breaks', () => {
		// The WE 2 sequence at centre 10, σ 0.5.
		expect(ruleBreaks([10.25, 11.25, 9.85, 11.1, 10.05], 10, 0.5).map((b) => b.rule)).toEqual(['we2', 'n5']);
		expect(ruleBreaks([1, 2, 3, 4, 5, 6], 3, 0)).toEqual([]);
		expect(ruleBreaks([1, 2, 3, 4, 5, 6], null, 1)).toEqual([]);
	});
	it('has twelve named rules', () => {
		expect(RULE_IDS).toEqual(['we1', 'we2', 'we3', 'we4', 'n1', 'n2', 'n3', 'n4', 'n5', 'n6', 'n7', 'n8'] satisfies RuleId[]);
	});
});
