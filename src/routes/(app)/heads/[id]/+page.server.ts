import { fail } from '@sveltejs/kit';
import { fieldErrors } from '$lib/schemas/auth';
import { comebackSchema, releaseSchema } from '$lib/schemas/heads';
import { posLabel } from '$lib/inspection';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { orError, orFail } from '$lib/server/http';
import { idParam, whoIs } from '$lib/server/params';
import { DECISION_LABEL } from '$lib/server/services/decisions';
import { headView, releaseBlockers } from '$lib/server/services/head-view';
import { registerComeback, release } from '$lib/server/services/heads';
import { emailHeadReport } from '$lib/server/services/report';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'viewer');
	const id = idParam(event.params.id);
	const view = await orError(() => headView(actor.shopId, id));
	const { head, family } = view;
	const blockers = releaseBlockers(view);
	return {
		head: { id: head.id, serial: head.serial, customer: head.customer, customerEmail: head.customerEmail, receivedOn: head.receivedOn, releasedOn: head.releasedOn, mileageKm: head.mileageKm, engineHours: head.engineHours, complaint: head.complaint, status: head.status, overrideReason: head.releaseOverrideReason },
		family: { id: family.id, code: family.code, description: family.description, cylinders: family.cylinders, intakeValves: family.intakeValves, exhaustValves: family.exhaustValves },
		leakage: view.leakage.map((l) => ({ cylinder: l.cylinder, pct: l.leakagePct, path: l.leakPath, inKpa: l.pressureInKpa, heldKpa: l.pressureHeldKpa })),
		positions: view.positions.map((pos, i) => {
			const ar = view.stages.as_received[i];
			const fi = view.stages.final[i];
			const d = view.decisions.get(ar.key);
			return {
				key: ar.key,
				label: posLabel(pos, family),
				side: pos.side,
				arCount: Object.keys(ar.cells).length,
				arFlags: ar.flags.map((f) => f.text),
				arFailing: ar.failing,
				suggested: ((k) => (k ? DECISION_LABEL[k] : null))(view.suggestions.get(ar.key)?.kind ?? null),
				decision: d ? DECISION_LABEL[d.kind] : null,
				finalCount: Object.keys(fi.cells).length,
				vacuum: fi.cells.vacuum_hold?.value ?? null,
				fluid: fi.cells.fluid_hold?.value ?? null,
				finalFlags: fi.flags.map((f) => f.text),
				finalFailing: fi.failing
			};
		}),
		blockers: blockers.map((b) => ({ key: b.key, label: posLabel(b.pos, family), reasons: b.reasons })),
		returns: view.returns,
		comeback: view.comeback,
		marks: view.marks,
		today: view.today,
		can: { work: roleAtLeast(actor.role, 'machinist'), override: actor.role === 'owner' }
	};
};

export const actions: Actions = {
	release: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		const parsed = releaseSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { action: 'release', message: 'The release was not recorded.', errors: fieldErrors(parsed.error) });
		const override = parsed.data.override === 'on';
		// Releasing over a failing check is the owner's decision alone.
		if (override) requireRole(event, 'owner');
		const how = { override, reason: parsed.data.reason, isOwner: actor.role === 'owner' };
		return orFail(
			async () => {
				const r = await release(actor.shopId, whoIs(actor), id, how);
				return { action: 'release', ok: true, message: r.overridden ? `Released on ${r.releasedOn} over the open checks; the reason is on record.` : `Released on ${r.releasedOn}.` };
			},
			(e) => ({ action: 'release', message: e.message, errors: e.fields }),
			[403, 404]
		);
	},
	emailReport: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		return orFail(
			async () => {
				const { to, sent } = await emailHeadReport(actor.shopId, actor.shopName, whoIs(actor), id);
				return {
					action: 'emailReport',
					ok: true,
					message: sent.failed ? `The report to ${to} is queued but could not be sent yet (${sent.errors[0]}); it will be retried.` : `Report sent to ${to}.`
				};
			},
			(e) => ({ action: 'emailReport', message: e.message, errors: e.fields })
		);
	},
	comeback: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		const form = await event.request.formData();
		const raw = {
			returnedOn: String(form.get('returnedOn') ?? ''),
			usageUnit: String(form.get('usageUnit') ?? 'km'),
			usage: String(form.get('usage') ?? ''),
			whatFailed: String(form.get('whatFailed') ?? '').slice(0, 4000),
			positions: form.getAll('positions').map(String)
		};
		const parsed = comebackSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { action: 'comeback', message: 'The comeback was not saved: correct the fields marked.', values: raw, errors: fieldErrors(parsed.error) });
		const data = parsed.data;
		return orFail(
			async () => {
				const head = await registerComeback(actor.shopId, whoIs(actor), id, data);
				return { action: 'comeback', ok: true, message: `Comeback recorded as job ${head.serial}.`, comebackId: head.id };
			},
			(e) => ({ action: 'comeback', message: e.message, values: raw, errors: e.fields })
		);
	}
};
