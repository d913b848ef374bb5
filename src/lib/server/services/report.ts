// The customer's head report: the head and job, as-received against final per valve position,
// the work done, the bench seal tests, the flags and the cautions. One model feeds the printable
// page and the e-mail (plain text first, with a simple HTML part).
import { CAUTIONS } from '$lib/cautions';
import { MEASUREMENT_INFO, MEASUREMENTS, UNIT_LABEL, type Measurement } from '$lib/measurements';
import { posLabel, SEAL_TESTS, STAGE_LABEL } from '$lib/inspection';
import { LEAK_PATH_LABEL, STATUS_LABEL } from '$lib/schemas/heads';
import { inShop } from '../db';
import { invalid } from '../errors';
import { deliverQueued, queueMail } from '../mail';
import { audit } from '../queries/audit';
import { DECISION_LABEL } from './decisions';
import type { Who } from './entry';
import { releaseBlockers, viewOrRefuse, type HeadView } from './head-view';

/** The measurements the report compares, in order; the bore as its largest reading. */
// Every measurement of a valve position but the bench seal tests (and leak-down, per cylinder).
export const REPORT_MEASUREMENTS: Measurement[] = MEASUREMENTS.filter((m) => !SEAL_TESTS.includes(m) && m !== 'leakdown');

export interface ReportValue {
	text: string | null;
	flagged: boolean;
}

export interface ReportPosition {
	key: string;
	label: string;
	side: 'intake' | 'exhaust';
	values: { measurement: Measurement; label: string; asReceived: ReportValue; final: ReportValue }[];
	ovality: { asReceived: string | null; final: string | null };
	taper: { asReceived: string | null; final: string | null };
	work: { kind: string; note: string; suggested: string | null } | null;
	seal: { vacuum: string | null; fluid: string | null; passed: boolean | null };
	flags: string[];
}

export interface HeadReport {
	shopName: string;
	serial: string;
	family: string;
	customer: string;
	status: string;
	receivedOn: string;
	releasedOn: string | null;
	usage: string | null;
	complaint: string;
	comebackOf: string | null;
	leakage: { cylinder: number; pct: string; path: string; gauge: string | null }[];
	positions: ReportPosition[];
	sealMarks: string;
	overrideReason: string | null;
	openChecks: number;
	returns: { serial: string; on: string; whatFailed: string }[];
	cautions: readonly string[];
	generatedOn: string;
}

const fmt = (m: Measurement, v: number | undefined | null) => (v === undefined || v === null ? null : `${v.toFixed(MEASUREMENT_INFO[m].decimals)} ${UNIT_LABEL[MEASUREMENT_INFO[m].units[0]]}`);

export function buildReport(view: HeadView, shopName: string): HeadReport {
	const { head, family } = view;
	const blockers = releaseBlockers(view);
	const positions: ReportPosition[] = view.positions.map((pos, i) => {
		const ar = view.stages.as_received[i];
		const fi = view.stages.final[i];
		const values = REPORT_MEASUREMENTS.map((m) => ({
			measurement: m,
			label: MEASUREMENT_INFO[m].label,
			asReceived: { text: fmt(m, ar.cells[m]?.value), flagged: Boolean(ar.cells[m]?.flags.some((f) => f.level === 'bad')) },
			final: { text: fmt(m, fi.cells[m]?.value), flagged: Boolean(fi.cells[m]?.flags.some((f) => f.level === 'bad')) }
		})).filter((v) => v.asReceived.text !== null || v.final.text !== null);
		const d = view.decisions.get(ar.key);
		const vac = fi.cells.vacuum_hold;
		const fluid = fi.cells.fluid_hold;
		const sealCells = SEAL_TESTS.map((m) => fi.cells[m]).filter((c) => c !== undefined);
		const flags = [
			...ar.flags.filter((f) => f.kind !== 'fleet').map((f) => `As received: ${f.text}`),
			...fi.flags.filter((f) => f.kind !== 'fleet').map((f) => `Final: ${f.text}`)
		];
		return {
			key: ar.key,
			label: posLabel(pos, family),
			side: pos.side,
			values,
			ovality: { asReceived: fmt('clearance', ar.geometry.ovality), final: fmt('clearance', fi.geometry.ovality) },
			taper: { asReceived: fmt('clearance', ar.geometry.taper), final: fmt('clearance', fi.geometry.taper) },
			work: d ? { kind: DECISION_LABEL[d.kind], note: d.note, suggested: d.suggested ? DECISION_LABEL[d.suggested] : null } : null,
			seal: {
				vacuum: vac ? `${vac.value.toFixed(1)} % held` : null,
				fluid: fluid ? `${Math.round(fluid.value)} s without a drip` : null,
				passed: sealCells.length ? !sealCells.some((c) => c!.flags.some((f) => f.level === 'bad')) : null
			},
			flags
		};
	});
	return {
		shopName,
		serial: head.serial,
		family: `${family.code}${family.description ? ` — ${family.description}` : ''}`,
		customer: head.customer,
		status: STATUS_LABEL[head.status],
		receivedOn: head.receivedOn,
		releasedOn: head.releasedOn,
		usage: head.mileageKm !== null ? `${head.mileageKm.toLocaleString('en-US')} km` : head.engineHours !== null ? `${head.engineHours.toLocaleString('en-US')} h` : null,
		complaint: head.complaint,
		comebackOf: view.comeback ? view.comeback.originalSerial : null,
		leakage: view.leakage.map((l) => ({
			cylinder: l.cylinder,
			pct: `${l.leakagePct.toFixed(1)} %`,
			path: LEAK_PATH_LABEL[l.leakPath],
			gauge: l.pressureInKpa !== null && l.pressureHeldKpa !== null ? `${l.pressureInKpa.toFixed(0)} kPa in, ${l.pressureHeldKpa.toFixed(0)} kPa held` : null
		})),
		positions,
		sealMarks: `A valve passes the vacuum test holding at least ${view.marks.vacuumHoldPassPct} % of the applied vacuum, and the fluid test with no drip in ${view.marks.fluidHoldPassSeconds} s.`,
		overrideReason: head.releaseOverrideReason,
		openChecks: blockers.length,
		returns: view.returns.map((r) => ({ serial: r.serial, on: r.receivedOn, whatFailed: r.whatFailed })),
		cautions: CAUTIONS,
		generatedOn: view.today
	};
}

function escapeHtml(s: string): string {
	return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

export function reportMail(r: HeadReport) {
	const lines: string[] = [];
	lines.push(`Head report: ${r.serial}`, `${r.shopName}`, '');
	lines.push(`Engine family: ${r.family}`, `Customer: ${r.customer}`, `Received: ${r.receivedOn}`);
	if (r.releasedOn) lines.push(`Released: ${r.releasedOn}`);
	else lines.push(`Status: ${r.status} (not released yet)`);
	if (r.usage) lines.push(`Mileage / hours at intake: ${r.usage}`);
	if (r.complaint) lines.push(`Complaint: ${r.complaint}`);
	if (r.comebackOf) lines.push(`This job is a comeback of head ${r.comebackOf}.`);
	if (r.leakage.length) {
		lines.push('', 'Cylinder leakage at intake (in the vehicle):');
		for (const l of r.leakage) lines.push(`  Cylinder ${l.cylinder}: ${l.pct}, heard at: ${l.path}${l.gauge ? ` (${l.gauge})` : ''}`);
	}
	lines.push('', `Per valve position (${STAGE_LABEL.as_received.toLowerCase()} → final):`);
	for (const p of r.positions) {
		lines.push('', `${p.label}`);
		for (const v of p.values) lines.push(`  ${v.label}: ${v.asReceived.text ?? '—'}${v.asReceived.flagged ? ' (!)' : ''} → ${v.final.text ?? '—'}${v.final.flagged ? ' (!)' : ''}`);
		if (p.work) lines.push(`  Work done: ${p.work.kind}${p.work.note ? ` — ${p.work.note}` : ''}`);
		if (p.seal.vacuum || p.seal.fluid) lines.push(`  Seal test: ${[p.seal.vacuum, p.seal.fluid].filter(Boolean).join('; ')} — ${p.seal.passed ? 'pass' : 'FAIL'}`);
		for (const f of p.flags) lines.push(`  ! ${f}`);
	}
	lines.push('', r.sealMarks);
	if (r.overrideReason) lines.push('', `Released by the shop owner over an open check: ${r.overrideReason}`);
	lines.push('', 'Cautions:');
	for (const c of r.cautions) lines.push(`  - ${c}`);
	lines.push('', `Report of ${r.generatedOn}. Lengths in mm (1 in = 25.4 mm), roughness in µm.`, '', '— Lapmark');

	const cell = (v: ReportValue) => `<td style="padding:2px 8px;${v.flagged ? 'color:#b3261e;font-weight:600' : ''}">${escapeHtml(v.text ?? '—')}</td>`;
	const html = [
		`<h2>Head report: ${escapeHtml(r.serial)}</h2>`,
		`<p>${escapeHtml(r.shopName)}<br>Engine family: ${escapeHtml(r.family)}<br>Customer: ${escapeHtml(r.customer)}<br>Received: ${r.receivedOn}${r.releasedOn ? `<br>Released: ${r.releasedOn}` : `<br>Status: ${escapeHtml(r.status)} (not released yet)`}</p>`,
		...r.positions.map(
			(p) =>
				`<h3 style="color:${p.side === 'intake' ? '#0072b2' : '#d55e00'}">${escapeHtml(p.label)}</h3><table><tr><th></th><th>As received</th><th>Final</th></tr>${p.values
					.map((v) => `<tr><td style="padding:2px 8px">${escapeHtml(v.label)}</td>${cell(v.asReceived)}${cell(v.final)}</tr>`)
					.join('')}</table>${p.work ? `<p>Work done: ${escapeHtml(p.work.kind)}${p.work.note ? ` — ${escapeHtml(p.work.note)}` : ''}</p>` : ''}${
					p.seal.vacuum || p.seal.fluid ? `<p>Seal test: ${escapeHtml([p.seal.vacuum, p.seal.fluid].filter(Boolean).join('; '))} — ${p.seal.passed ? 'pass' : '<strong>fail</strong>'}</p>` : ''
				}`
		),
		`<p>${escapeHtml(r.sealMarks)}</p>`,
		r.overrideReason ? `<p><strong>Released by the shop owner over an open check:</strong> ${escapeHtml(r.overrideReason)}</p>` : '',
		`<h3>Cautions</h3><ul>${r.cautions.map((c) => `<li>${escapeHtml(c)}</li>`).join('')}</ul>`,
		`<p>— Lapmark</p>`
	].join('\n');
	return { subject: `Head report ${r.serial} from ${r.shopName}`, kind: 'head_report', text: lines.join('\n'), html };
}

/** The printable report of one head of the shop (404 when there is none). */
export function headReport(shopId: string, shopName: string, headId: string): Promise<HeadReport> {
	return inShop(shopId, async (tx) => buildReport(await viewOrRefuse(tx, shopId, headId), shopName));
}

/**
 * Mails the report to the customer's address on record: queued and audited in one transaction,
 * sent after it commits (a failed send stays queued and is retried). 400 when the head has no
 * customer e-mail address.
 */
export async function emailHeadReport(shopId: string, shopName: string, who: Who, headId: string) {
	const { to, mailId } = await inShop(shopId, async (tx) => {
		const view = await viewOrRefuse(tx, shopId, headId);
		const to = view.head.customerEmail;
		if (!to) throw invalid('This head has no customer e-mail address on record.');
		const mail = reportMail(buildReport(view, shopName));
		const mailId = await queueMail(tx, { ...mail, to, shopId });
		await audit(tx, shopId, who, { entity: 'head_report', entityId: headId, action: 'create', after: { head: view.head.serial, to, mailId } });
		return { to, mailId };
	});
	return { to, sent: await deliverQueued([mailId]) };
}
