import { error, fail } from '@sveltejs/kit';
import { decideSchema } from '$lib/schemas/heads';
import { fieldErrors } from '$lib/schemas/auth';
import { MEASUREMENT_INFO, type Measurement } from '$lib/measurements';
import { posLabel } from '$lib/inspection';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { idParam, whoIs } from '$lib/server/params';
import { DECISION_LABEL } from '$lib/server/services/decisions';
import { loadHeadView } from '$lib/server/services/head-view';
import { recordDecision } from '$lib/server/services/heads';
import type { Actions, PageServerLoad } from './$types';

const SHOWN: Measurement[] = ['stem_diameter', 'guide_bore', 'clearance', 'face_runout', 'seat_runout', 'seat_width', 'margin'];

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'viewer');
	const id = idParam(event.params.id);
	return withShop(db, actor.shopId, async (tx) => {
		const view = await loadHeadView(tx, actor.shopId, id);
		if (!view) error(404, 'No such head in this shop.');
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
	});
};

export const actions: Actions = {
	decide: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		const raw = Object.fromEntries(await event.request.formData());
		const parsed = decideSchema.safeParse(raw);
		if (!parsed.success) return fail(400, { pos: String(raw.pos ?? ''), message: 'The decision was not recorded.', errors: fieldErrors(parsed.error) });
		const { pos, kind, note, acknowledge } = parsed.data;
		const r = await withShop(db, actor.shopId, (tx) => recordDecision(tx, actor.shopId, whoIs(actor), id, { pos, kind, note, acknowledge: acknowledge === 'on' }));
		if (!r.ok) {
			if (r.code === 404) error(404, r.message);
			return fail(r.code, { pos, kind, note, message: r.message, warning: 'warning' in r ? r.warning?.text : undefined, errors: r.errors });
		}
		return { pos, ok: true, message: r.changed ? `${DECISION_LABEL[kind]}: recorded.` : 'No change.' };
	},
	acceptAll: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		return withShop(db, actor.shopId, async (tx) => {
			const view = await loadHeadView(tx, actor.shopId, id);
			if (!view) error(404, 'No such head in this shop.');
			let n = 0;
			for (const p of view.positions) {
				const key = `${p.cylinder}-${p.side}-${p.valve}`;
				const s = view.suggestions.get(key);
				if (view.decisions.has(key) || !s?.kind) continue;
				const r = await recordDecision(tx, actor.shopId, whoIs(actor), id, { pos: key, kind: s.kind, note: '', acknowledge: false });
				if (!r.ok) return fail(r.code, { pos: key, message: `${posLabel(p, view.family)}: ${r.message}`, errors: {} });
				n++;
			}
			return { pos: '', ok: true, message: n ? `Confirmed ${n} suggested decision${n === 1 ? '' : 's'}.` : 'Every position with a suggestion already has a decision.' };
		});
	}
};
