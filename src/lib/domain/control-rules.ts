// The run rules a control chart can be read with, by name (client and server): the Western
// Electric zone rules and Nelson's eight tests. The tests themselves are in
// $lib/server/stats/rules.ts.

export type RuleId = 'we1' | 'we2' | 'we3' | 'we4' | 'n1' | 'n2' | 'n3' | 'n4' | 'n5' | 'n6' | 'n7' | 'n8';

export interface RuleInfo {
	id: RuleId;
	set: 'western-electric' | 'nelson';
	name: string;
	description: string;
}

export const RULES: Readonly<Record<RuleId, RuleInfo>> = {
	we1: { id: 'we1', set: 'western-electric', name: 'WE 1', description: 'One point beyond 3σ (outside the control limits)' },
	we2: { id: 'we2', set: 'western-electric', name: 'WE 2', description: 'Two of three points in a row beyond 2σ on the same side' },
	we3: { id: 'we3', set: 'western-electric', name: 'WE 3', description: 'Four of five points in a row beyond 1σ on the same side' },
	we4: { id: 'we4', set: 'western-electric', name: 'WE 4', description: 'Eight points in a row on the same side of the centre line' },
	n1: { id: 'n1', set: 'nelson', name: 'Nelson 1', description: 'One point beyond 3σ' },
	n2: { id: 'n2', set: 'nelson', name: 'Nelson 2', description: 'Nine points in a row on the same side of the centre line' },
	n3: { id: 'n3', set: 'nelson', name: 'Nelson 3', description: 'Six points in a row steadily increasing or decreasing' },
	n4: { id: 'n4', set: 'nelson', name: 'Nelson 4', description: 'Fourteen points in a row alternating up and down' },
	n5: { id: 'n5', set: 'nelson', name: 'Nelson 5', description: 'Two of three points in a row beyond 2σ on the same side' },
	n6: { id: 'n6', set: 'nelson', name: 'Nelson 6', description: 'Four of five points in a row beyond 1σ on the same side' },
	n7: { id: 'n7', set: 'nelson', name: 'Nelson 7', description: 'Fifteen points in a row within 1σ of the centre line (either side)' },
	n8: { id: 'n8', set: 'nelson', name: 'Nelson 8', description: 'Eight points in a row beyond 1σ, on either side' }
};

export const RULE_IDS = Object.keys(RULES) as RuleId[];
export const WESTERN_ELECTRIC: RuleId[] = ['we1', 'we2', 'we3', 'we4'];
export const NELSON: RuleId[] = ['n1', 'n2', 'n3', 'n4', 'n5', 'n6', 'n7', 'n8'];


/** The `rules` parameter: rule ids and the sets `we`, `nelson`, `all` (or `none`), comma-separated; null when a name is unknown. */
export function parseRules(s: string): RuleId[] | null {
	const out = new Set<RuleId>();
	for (const raw of s.split(',')) {
		const t = raw.trim().toLowerCase();
		if (!t || t === 'none') continue;
		if (t === 'we') WESTERN_ELECTRIC.forEach((r) => out.add(r));
		else if (t === 'nelson') NELSON.forEach((r) => out.add(r));
		else if (t === 'all') RULE_IDS.forEach((r) => out.add(r));
		else if ((RULE_IDS as string[]).includes(t)) out.add(t as RuleId);
		else return null;
	}
	return RULE_IDS.filter((r) => out.has(r));
}
