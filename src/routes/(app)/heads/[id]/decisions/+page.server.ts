import { fail } from '@sveltejs/kit';
import { decideSchema } from '$lib/schemas/heads';
import { fieldErrors } from '$lib/schemas/auth';
import { MEASUREMENT_INFO, type Measurement } from '$lib/measurements';
import { posLabel } from '$lib/inspection';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { orError, orFail } from '$lib/server/http';
import { idParam, whoIs } from '$lib/server/params';
import { DECISION_LABEL } from '$lib/server/services/decisions';
import { headView } from '$lib/server/services/head-view';
import { acceptSuggestions, decide } from '$lib/server/services/heads';
import type { Actions, PageServerLoad } from './$types';

const SHOWN: Measurement[] = ['stem_diameter', 'guide_bore', 'clearance', 'face_runout', 'seat_runout', 'seat_width', 'margin'];

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'viewer');
	const id = idParam(event.params.id);
	const view = await orError(() => headView(actor.shopId, id));
	const { head, family } = view;
	return {
		head: { id: head.id, serial: head.serial, status: head.status, customer: head.customer },
		family: { code: family.code },
		labels: DECISION_LABEL,
		positions: view.stages.as_received.map((p) => {
			const s = view.suggestions.get(p.key)!;
			const d = view.decisions.get(p.key);
			return {
				key: p.key,
				label: posLabel(p.pos, family),
				side: p.pos.side,
				readings: SHOWN.filter((m) => p.cells[m]).map((m) => ({
					label: MEASUREMENT_INFO[m].label,
					text: `${p.cells[m]!.value.toFixed(MEASUREMENT_INFO[m].decimals)} mm`,
					bad: p.cells[m]!.flags.some((f) => f.level === 'bad')
				})),
				ovality: p.geometry.ovality,
				taper: p.geometry.taper,
				suggested: s.kind,
				rule: s.rule,
				guide: s.guide,
				decision: d ? { kind: d.kind, note: d.note, decidedAt: d.decidedAt.toISOString().slice(0, 16).replace('T', ' ') } : null
			};
		}),
		canDecide: roleAtLeast(actor.role, 'machinist') && head.status !== 'released'
	};
};

export const actions: Actions = {
	decide: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		const raw = Object.fromEntries(await event.request.formData());
		const parsed = decideSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { pos: String(raw.pos ?? ''), message: 'The decision was not recorded.', errors: fieldErrors(parsed.error) });
		const { pos, kind, note, acknowledge } = parsed.data;
		return orFail(
			async () => {
				const changed = await decide(actor.shopId, whoIs(actor), id, { pos, kind, note, acknowledge: acknowledge === 'on' });
				return { pos, ok: true, message: changed ? `${DECISION_LABEL[kind]}: recorded.` : 'No change.' };
			},
			(e) => ({ pos, kind, note, message: e.message, warning: (e.details.warning as { text: string } | undefined)?.text, errors: e.fields })
		);
	},
	acceptAll: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		// A refusal part-way keeps the decisions confirmed before it (acceptSuggestions returns it).
		const r = await orError(() => acceptSuggestions(actor.shopId, whoIs(actor), id));
		if (!r.ok) return fail(r.code, { pos: r.pos, message: r.message, errors: {} });
		const n = r.accepted;
		return { pos: '', ok: true, message: n ? `Confirmed ${n} suggested decision${n === 1 ? '' : 's'}.` : 'Every position with a suggestion already has a decision.' };
	}
};
