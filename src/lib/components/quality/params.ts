// What the rework-quality page asks its panels for: one family, side and measurement of the final
// check, narrowed by the shared filters.
import type { Measurement, Side } from '$lib/measurements';

export interface QualityParams {
	family: string;
	side: Side;
	measurement: Measurement;
	machinist?: string;
	from?: string;
	to?: string;
	customer?: string;
	mileageMin?: number;
	mileageMax?: number;
	[key: string]: string | number | undefined;
}
