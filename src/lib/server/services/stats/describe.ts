// Summary statistics of numbers the client sends (no database).
import type { DescribeResponse } from '../../../contract';
import { describe, tukeyFlag } from '../../stats';

export function describeValues(values: readonly number[]): DescribeResponse {
	const s = describe(values);
	let outside = 0;
	for (const x of values) if (tukeyFlag(x, s.fences)) outside++;
	return { ...s, tukeyOutside: outside };
}
