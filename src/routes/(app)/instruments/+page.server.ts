import { error, fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { calibrationSchema, instrumentSchema, retireSchema } from '$lib/schemas/families';
import { toCanonical } from '$lib/measurements';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { orError, orFail } from '$lib/server/http';
import { whoIs } from '$lib/server/params';
import { today } from '$lib/server/services/head-view';
import { calibrateInstrument, instrumentsAndHistory, registerInstrument, retireInstrument } from '$lib/server/services/instruments';
import type { Actions, PageServerLoad } from './$types';

const DUE_SOON_DAYS = 30;

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	const { instruments, history } = await instrumentsAndHistory(actor.shopId);
	return { instruments, history, dueSoonDays: DUE_SOON_DAYS, today: today(), canEdit: roleAtLeast(actor.role, 'engineer') };
};

export const actions: Actions = {
	create: async (event) => {
		const actor = requireRole(event, 'engineer');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = instrumentSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'create', values: raw, errors: fieldErrors(parsed.error) });
		const d = parsed.data;
		if (d.calibratedOn > today()) return fail(400, { action: 'create', values: raw, errors: { calibratedOn: 'A calibration cannot be in the future.' } });
		const resolutionMm = d.resolution === null ? null : d.resolutionUnit === 'um' ? d.resolution / 1000 : toCanonical(d.resolution, d.resolutionUnit);
		if (resolutionMm !== null && (resolutionMm <= 0 || resolutionMm > 1)) return fail(400, { action: 'create', values: raw, errors: { resolution: 'A resolution is above zero and at most 1 mm.' } });
		const gauge = { name: d.name, kind: d.kind, serial: d.serial, resolutionMm, calibratedOn: d.calibratedOn, intervalDays: d.intervalDays };
		return orFail(
			async () => {
				await registerInstrument(actor.shopId, whoIs(actor), gauge);
				return { action: 'create', ok: true, message: `${d.name} registered.` };
			},
			(e) => ({ action: 'create', values: raw, errors: e.fields })
		);
	},
	calibrate: async (event) => {
		const actor = requireRole(event, 'engineer');
		const raw = Object.fromEntries(await event.request.formData()) as Record<string, string>;
		const parsed = calibrationSchema.safeParse(raw);
		if (!parsed.success) {
			if (!/^[0-9a-f-]{36}$/i.test(raw.id ?? '')) error(404, 'No such gauge in this shop.');
			return fail(400, { action: 'calibrate', id: raw.id, values: raw, errors: fieldErrors(parsed.error) });
		}
		const d = parsed.data;
		if (d.calibratedOn > today()) return fail(400, { action: 'calibrate', id: d.id, values: raw, errors: { calibratedOn: 'A calibration cannot be in the future.' } });
		const name = await orError(() => calibrateInstrument(actor.shopId, whoIs(actor), d));
		return { action: 'calibrate', id: d.id, ok: true, message: `Calibration of ${name} on ${d.calibratedOn} recorded.` };
	},
	retire: async (event) => {
		const actor = requireRole(event, 'engineer');
		const parsed = retireSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such gauge in this shop.');
		const retired = parsed.data.retired === 'yes';
		const name = await orError(() => retireInstrument(actor.shopId, whoIs(actor), parsed.data.id, retired));
		return { action: 'retire', ok: true, message: retired ? `${name} retired: it is no longer offered in the grid.` : `${name} back in use.` };
	}
};
