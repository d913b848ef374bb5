// Run rules for a Shewhart chart of individuals: the Western Electric zone rules (Western Electric
// Statistical Quality Control Handbook, 1956; as listed in the NIST/SEMATECH e-Handbook §6.3.2)
// and Nelson's eight tests (L. S. Nelson, "The Shewhart control chart — tests for special
// causes", Journal of Quality Technology 16(4), 1984). No npm package of standing implements
// them, hence our own code; docs/REFERENCES.md B9.
//
// Zones are measured from the centre line in units of σ (for individuals σ = MR̄/d2). "Beyond"
// is strict: a point exactly on a zone line is inside it, as a point on a control limit is not
// beyond it. A point exactly on the centre line is on neither side and ends a run on one side.
// A rule's break is listed at the point that completes its pattern (the last point of the run or
// window), once per point; the first point of the pattern is given beside it.

import { RULE_IDS, type RuleId } from '../../domain/control-rules';

export { NELSON, RULE_IDS, RULES, WESTERN_ELECTRIC, type RuleId, type RuleInfo } from '../../domain/control-rules';

export interface RuleBreak {
	rule: RuleId;
	/** Index of the point that completes the pattern. */
	index: number;
	/** Index of the pattern's first point. */
	from: number;
}

/** k of the last m points beyond `zone`·σ on the side of the current point (which must be beyond). */
function kOfM(z: readonly number[], zone: number, k: number, m: number): [number, number][] {
	const out: [number, number][] = [];
	for (let i = 0; i < z.length; i++) {
		const side = z[i] > zone ? 1 : z[i] < -zone ? -1 : 0;
		if (side === 0) continue;
		const start = Math.max(0, i - m + 1);
		let count = 0;
		let first = i;
		for (let j = start; j <= i; j++) {
			if (side * z[j] > zone) {
				count++;
				if (j < first) first = j;
			}
		}
		if (count >= k) out.push([i, first]);
	}
	return out;
}

/** Every point ending a run of at least `len` consecutive points for which `inRun(i)` holds. */
function runs(n: number, len: number, inRun: (i: number) => boolean, sameRun: (i: number) => boolean = () => true): [number, number][] {
	const out: [number, number][] = [];
	let start = -1;
	for (let i = 0; i < n; i++) {
		if (!inRun(i)) {
			start = -1;
			continue;
		}
		if (start < 0 || !sameRun(i)) start = i;
		if (i - start + 1 >= len) out.push([i, i - len + 1]);
	}
	return out;
}

const sign = (v: number) => (v > 0 ? 1 : v < 0 ? -1 : 0);

function sameSide(z: readonly number[], len: number): [number, number][] {
	return runs(z.length, len, (i) => z[i] !== 0, (i) => i > 0 && sign(z[i]) === sign(z[i - 1]) && z[i - 1] !== 0);
}

/** Points i whose last `len` points rise (or fall) strictly each step: `len − 1` steps of one sign. */
function trend(x: readonly number[], len: number): [number, number][] {
	return windows(x, len, (s, prev) => s !== 0 && (prev === null || s === prev));
}

/** Points i whose last `len` points alternate up and down: `len − 1` steps, each of the other sign. */
function alternating(x: readonly number[], len: number): [number, number][] {
	return windows(x, len, (s, prev) => s !== 0 && (prev === null || s === -prev));
}

/** Points i whose last `len` points' steps (signs of x[j] − x[j−1]) each pass `ok(step, previous step)`. */
function windows(x: readonly number[], len: number, ok: (step: number, prev: number | null) => boolean): [number, number][] {
	const out: [number, number][] = [];
	for (let i = len - 1; i < x.length; i++) {
		let prev: number | null = null;
		let all = true;
		for (let j = i - len + 2; j <= i && all; j++) {
			const s = sign(x[j] - x[j - 1]);
			all = ok(s, prev);
			prev = s;
		}
		if (all) out.push([i, i - len + 1]);
	}
	return out;
}

/**
 * The breaks of `rules` over `values` (in time order) for a chart with centre `centre` and
 * σ `sigma`, in rule order then point order. A σ of zero or less (or missing) gives none.
 */
export function ruleBreaks(values: readonly number[], centre: number | null, sigma: number | null, rules: readonly RuleId[] = RULE_IDS): RuleBreak[] {
	if (centre === null || sigma === null || !(sigma > 0)) return [];
	const z = values.map((v) => (v - centre) / sigma);
	const found = (rule: RuleId): [number, number][] => {
		switch (rule) {
			case 'we1':
			case 'n1':
				return z.flatMap((v, i) => (Math.abs(v) > 3 ? [[i, i] as [number, number]] : []));
			case 'we2':
			case 'n5':
				return kOfM(z, 2, 2, 3);
			case 'we3':
			case 'n6':
				return kOfM(z, 1, 4, 5);
			case 'we4':
				return sameSide(z, 8);
			case 'n2':
				return sameSide(z, 9);
			case 'n3':
				return trend(values, 6);
			case 'n4':
				return alternating(values, 14);
			case 'n7':
				return runs(z.length, 15, (i) => Math.abs(z[i]) < 1);
			case 'n8':
				return runs(z.length, 8, (i) => Math.abs(z[i]) > 1);
		}
	};
	const out: RuleBreak[] = [];
	for (const rule of RULE_IDS) {
		if (!rules.includes(rule)) continue;
		for (const [index, from] of found(rule)) out.push({ rule, index, from });
	}
	return out;
}
