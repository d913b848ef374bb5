// A measurement against the head's mileage: least-squares line with the 95 % band of the mean.
import type { WearResponse } from '../../../contract';
import { MEASUREMENT_INFO } from '../../../measurements';
import { WEAR_MAX_POINTS, type WearQuery } from '../../../schemas/stats';
import type { Conn } from '../../db/scope';
import { seriesKeys } from '../../db/series';
import { readingsWithMileage } from '../../queries/stats';
import { linearFit } from '../../stats';
import { echo, resolveFamily, selection } from './selection';

export async function wear(conn: Conn, shopId: string, q: WearQuery): Promise<WearResponse> {
	const { family } = await resolveFamily(conn, shopId, q.family);
	const rows = await readingsWithMileage(conn, shopId, selection(q, seriesKeys(q.measurement, q.stage, q.side), family));
	const fit = linearFit(
		rows.map((r) => r.mileageKm),
		rows.map((r) => r.value)
	);
	const band: WearResponse['band'] = [];
	if (rows.length) {
		let lo = Infinity;
		let hi = -Infinity;
		for (const r of rows) {
			if (r.mileageKm < lo) lo = r.mileageKm;
			if (r.mileageKm > hi) hi = r.mileageKm;
		}
		for (let i = 0; i <= 40; i++) {
			const b = fit.band(lo + ((hi - lo) * i) / 40);
			if (b) band.push(b);
		}
	}
	// Systematic sample in reading order: the same readings give the same points.
	const sampled = rows.length > WEAR_MAX_POINTS;
	const picked = sampled ? Array.from({ length: WEAR_MAX_POINTS }, (_, i) => rows[Math.floor((i * rows.length) / WEAR_MAX_POINTS)]) : rows;
	const per10k = (x: number | null) => (x === null ? null : x * 10_000);
	return {
		measurement: q.measurement,
		stage: q.stage,
		unit: MEASUREMENT_INFO[q.measurement].unit,
		filters: echo(q),
		n: fit.n,
		slopePer10000Km: per10k(fit.slope),
		intercept: fit.intercept,
		r2: fit.r2,
		residualSd: fit.residualSd,
		slopeSePer10000Km: per10k(fit.slopeSe),
		band,
		points: picked.map((r) => ({ mileageKm: r.mileageKm, value: r.value })),
		sampled
	};
}
