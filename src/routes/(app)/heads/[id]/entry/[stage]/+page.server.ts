import { error } from '@sveltejs/kit';
import { STAGE_MEASUREMENTS, stageFromSlug, posLabel, BORE_CELLS } from '$lib/inspection';
import { roleAtLeast } from '$lib/server/auth/access';
import { requireRole } from '$lib/server/auth/guards';
import { orError, orFail } from '$lib/server/http';
import { idParam, whoIs } from '$lib/server/params';
import { EntryRefused, saveGridEntries, type EntryInput } from '$lib/server/services/entry';
import { gaugeList, headView } from '$lib/server/services/head-view';
import type { Actions, PageServerLoad } from './$types';

function stageParam(slug: string) {
	const stage = stageFromSlug(slug);
	if (!stage) error(404, 'The stages are as-received and final.');
	return stage;
}

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'viewer');
	const id = idParam(event.params.id);
	const stage = stageParam(event.params.stage);
	const view = await orError(() => headView(actor.shopId, id, { fleet: stage }));
	const { head, family } = view;
	return {
		head: { id: head.id, serial: head.serial, status: head.status, customer: head.customer, releasedOn: head.releasedOn },
		family: { code: family.code, cylinders: family.cylinders, intakeValves: family.intakeValves, exhaustValves: family.exhaustValves },
		stage,
		measurements: STAGE_MEASUREMENTS[stage],
		rows: view.stages[stage].map((p) => ({
			key: p.key,
			pos: p.pos,
			label: posLabel(p.pos, family),
			cells: Object.fromEntries(
				Object.entries(p.cells).map(([m, c]) => [m, { value: c!.value, day: c!.day, instrumentId: c!.instrumentId, by: c!.measuredBy, fromImport: c!.fromImport }])
			),
			bores: Object.fromEntries(BORE_CELLS.filter((k) => p.bores[k]).map((k) => [k, { value: p.bores[k]!.value, day: p.bores[k]!.day, instrumentId: p.bores[k]!.instrumentId }]))
		})),
		limits: view.limits,
		marks: view.marks,
		fleet: view.fleet[stage],
		gauges: gaugeList(view.gauges).map((g) => ({ id: g.id, name: g.name, serial: g.serial, kind: g.kind, retired: g.retired, calibrations: g.calibrations })),
		today: view.today,
		canEdit: roleAtLeast(actor.role, 'machinist') && head.status !== 'released'
	};
};

/** The grid's form: `c|<position>|<field>` values (with `o|…` holding what the page showed, so a
 * whole-grid submit without JavaScript saves only what changed), `unit|<column>`, `gauge|<column>`,
 * and `applied` for the vacuum column. */
function readForm(form: FormData): EntryInput {
	const cells: EntryInput['cells'] = [];
	const units: Record<string, string> = {};
	const instruments: Record<string, string> = {};
	for (const [name, v] of form) {
		if (typeof v !== 'string') continue;
		const [kind, a, b] = name.split('|');
		if (kind === 'c' && a && b) {
			const shown = form.get(`o|${a}|${b}`);
			if (typeof shown === 'string' && shown.trim() === v.trim()) continue;
			cells.push({ pos: a, field: b, text: v.slice(0, 40) });
		} else if (kind === 'unit' && a) units[a] = v;
		else if (kind === 'gauge' && a) instruments[a] = v;
	}
	const applied = form.get('applied');
	return { cells, units, instruments, appliedVacuum: typeof applied === 'string' ? applied : undefined };
}

export const actions: Actions = {
	save: async (event) => {
		const actor = requireRole(event, 'machinist');
		const id = idParam(event.params.id);
		const stage = stageParam(event.params.stage);
		const input = readForm(await event.request.formData());
		if (input.cells.length === 0) return { ok: true, changed: 0, message: 'Nothing had changed.' };
		return orFail(
			async () => {
				const r = await saveGridEntries(actor.shopId, whoIs(actor), id, stage, input);
				return { ok: true, changed: r.changed, status: r.status, message: r.changed ? `Saved ${r.changed} value${r.changed === 1 ? '' : 's'}.` : 'Nothing had changed.' };
			},
			(e) => ({ message: e instanceof EntryRefused ? `Nothing was saved: ${e.message}` : e.message, errors: e.fields })
		);
	}
};
