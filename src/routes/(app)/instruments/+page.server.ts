import { error, fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { calibrationSchema, instrumentSchema, retireSchema } from '$lib/schemas/families';
import { toCanonical } from '$lib/measurements';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { whoIs } from '$lib/server/params';
import { audit } from '$lib/server/queries/audit';
import { calibrationHistory, insertInstrument, instrumentById, listInstruments, recordCalibration, serialInUse, setRetired } from '$lib/server/queries/instruments';
import { today } from '$lib/server/services/head-view';
import type { Actions, PageServerLoad } from './$types';

const DUE_SOON_DAYS = 30;

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'machinist');
	return withShop(db, actor.shopId, async (tx) => {
		const [list, history] = await Promise.all([listInstruments(tx, actor.shopId), calibrationHistory(tx, actor.shopId)]);
		return { instruments: list, history, dueSoonDays: DUE_SOON_DAYS, today: today(), canEdit: roleAtLeast(actor.role, 'engineer') };
	});
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
		return withShop(db, actor.shopId, async (tx) => {
			if (await serialInUse(tx, actor.shopId, d.serial)) return fail(409, { action: 'create', values: raw, errors: { serial: `A gauge with serial ${d.serial} is already registered.` } });
			const row = await insertInstrument(tx, { shopId: actor.shopId, name: d.name, kind: d.kind, serial: d.serial, resolutionMm, calibratedOn: d.calibratedOn, intervalDays: d.intervalDays }, actor.userId);
			await audit(tx, actor.shopId, whoIs(actor), { entity: 'instrument', entityId: row.id, action: 'create', after: { name: d.name, kind: d.kind, serial: d.serial, resolutionMm, calibratedOn: d.calibratedOn, intervalDays: d.intervalDays } });
			return { action: 'create', ok: true, message: `${d.name} registered.` };
		});
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
		return withShop(db, actor.shopId, async (tx) => {
			const before = await recordCalibration(tx, { shopId: actor.shopId, instrumentId: d.id, calibratedOn: d.calibratedOn, intervalDays: d.intervalDays, note: d.note, recordedBy: actor.userId });
			if (!before) error(404, 'No such gauge in this shop.');
			await audit(tx, actor.shopId, whoIs(actor), {
				entity: 'instrument',
				entityId: d.id,
				action: 'update',
				before: { calibratedOn: before.calibratedOn, intervalDays: before.intervalDays },
				after: { calibratedOn: d.calibratedOn, intervalDays: d.intervalDays, note: d.note }
			});
			return { action: 'calibrate', id: d.id, ok: true, message: `Calibration of ${before.name} on ${d.calibratedOn} recorded.` };
		});
	},
	retire: async (event) => {
		const actor = requireRole(event, 'engineer');
		const parsed = retireSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) error(404, 'No such gauge in this shop.');
		return withShop(db, actor.shopId, async (tx) => {
			const before = await instrumentById(tx, actor.shopId, parsed.data.id);
			if (!before) error(404, 'No such gauge in this shop.');
			const retired = parsed.data.retired === 'yes';
			await setRetired(tx, actor.shopId, before.id, retired);
			await audit(tx, actor.shopId, whoIs(actor), { entity: 'instrument', entityId: before.id, action: 'update', before: { retired: before.retired }, after: { retired } });
			return { action: 'retire', ok: true, message: retired ? `${before.name} retired: it is no longer offered in the grid.` : `${before.name} back in use.` };
		});
	}
};
