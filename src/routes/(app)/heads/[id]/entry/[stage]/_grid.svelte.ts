// The inspection grid's state in the browser: what is in each cell, in which unit, whether the
// server has it. Every committed cell is saved on its own through the page's `save` action; a
// save that does not reach the server stays marked "not saved", is kept in localStorage (so a
// reload or a dropped connection loses nothing) and is retried with back-off until it lands.
import { deserialize } from '$app/forms';
import {
	MEASUREMENT_INFO,
	parseDecimal,
	pressureToKpa,
	roundSig,
	toCanonical,
	fromCanonical,
	vacuumHoldPercent,
	type Measurement,
	type Unit
} from '$lib/measurements';
import { typedFields, type EntryField } from '$lib/inspection';
import type { Stage } from '$lib/measurements';

export type CellStatus = 'saved' | 'saving' | 'unsaved' | 'error';

export interface Typed {
	text: string;
	unit: string;
	gauge: string;
	applied: string;
}

export interface CellRec {
	key: string;
	pos: string;
	field: EntryField;
	column: string;
	measurement: Measurement;
	/** What the input shows. */
	text: string;
	/** The value as last committed, canonical unit; null when empty. */
	canon: number | null;
	/** The value the server holds. */
	savedCanon: number | null;
	/** Day and gauge of the value as saved (today and the chosen gauge once edited here). */
	day: string;
	instrumentId: string | null;
	edited: boolean;
	status: CellStatus;
	message: string;
	/** What goes to the server for this cell; set when committed, cleared once saved. */
	typed: Typed | null;
	version: number;
}

export interface GridRow {
	key: string;
	cells: Record<string, { value: number; day: string; instrumentId: string | null }>;
	bores: Record<string, { value: number; day: string; instrumentId: string | null }>;
}

export const VACUUM_UNITS = ['pct', 'kPa', 'inHg'] as const;

export function columnOf(field: EntryField): string {
	return field.startsWith('bore:') ? 'bore' : field;
}
export function measurementOf(field: EntryField): Measurement {
	return field.startsWith('bore:') ? 'guide_bore' : (field as Measurement);
}
const isPressure = (u: string) => u === 'kPa' || u === 'inHg';

/** A value as the input shows it in `unit`: full precision, no floating-point noise. */
export function display(canon: number | null, unit: string): string {
	if (canon === null) return '';
	if (unit === 'pct' || unit === 's' || unit === 'mm' || unit === 'um') return String(roundSig(canon, 10));
	return String(roundSig(fromCanonical(canon, unit as Unit), 10));
}

const RETRY_STEPS_MS = [1000, 2000, 4000, 8000, 15000, 30000];

export class GridState {
	cells = $state<Record<string, CellRec>>({});
	units = $state<Record<string, string>>({});
	gauges = $state<Record<string, string>>({});
	applied = $state('');
	headStatus = $state('');
	retryIn = $state<number | null>(null);
	lastError = $state('');

	private inflight = new Set<string>();
	private again = new Set<string>();
	private attempt = 0;
	private timer: ReturnType<typeof setTimeout> | null = null;
	private tick: ReturnType<typeof setInterval> | null = null;

	constructor(
		private readonly opts: { headId: string; stage: Stage; action: string; today: string; rows: GridRow[]; headStatus: string }
	) {
		this.headStatus = opts.headStatus;
		const fields = typedFields(opts.stage);
		const units: Record<string, string> = {};
		for (const f of fields) units[columnOf(f)] = measurementOf(f) === 'vacuum_hold' ? 'pct' : MEASUREMENT_INFO[measurementOf(f)].units[0];
		this.units = units;
		this.gauges = Object.fromEntries(Object.keys(units).map((c) => [c, '']));
		const cells: Record<string, CellRec> = {};
		for (const row of opts.rows) {
			for (const field of fields) {
				const stored = field.startsWith('bore:') ? row.bores[field.slice(5)] : row.cells[field];
				const key = `${row.key}|${field}`;
				const column = columnOf(field);
				cells[key] = {
					key,
					pos: row.key,
					field,
					column,
					measurement: measurementOf(field),
					text: display(stored?.value ?? null, units[column]),
					canon: stored?.value ?? null,
					savedCanon: stored?.value ?? null,
					day: stored?.day ?? opts.today,
					instrumentId: stored?.instrumentId ?? null,
					edited: false,
					status: 'saved',
					message: '',
					typed: null,
					version: 0
				};
			}
		}
		this.cells = cells;
	}

	get storageKey() {
		return `lapmark:grid:${this.opts.headId}:${this.opts.stage}`;
	}

	get pending(): CellRec[] {
		return Object.values(this.cells).filter((c) => c.status === 'unsaved' || c.status === 'saving');
	}
	get failed(): CellRec[] {
		return Object.values(this.cells).filter((c) => c.status === 'error');
	}

	/** A new unit for a column: the inputs show their values in it. Vacuum in a pressure unit
	 * shows the held vacuum typed here only; saved holds stay shown as %. */
	setUnit(column: string, unit: string) {
		this.units[column] = unit;
		for (const c of Object.values(this.cells)) {
			if (c.column !== column || c.status === 'error') continue;
			if (column === 'vacuum_hold') c.text = isPressure(unit) ? '' : display(c.canon, 'pct');
			else c.text = display(c.canon, unit);
		}
	}

	/** Parses what a cell shows into its canonical value; a message when it cannot be saved. */
	parse(c: CellRec, text: string, unit = this.units[c.column], appliedText = this.applied): { canon: number | null } | { error: string } {
		const t = text.trim();
		if (t === '') return { canon: null };
		const n = parseDecimal(t);
		if (n === null) return { error: `“${t.slice(0, 20)}” is not a number. Type digits with one decimal point.` };
		const info = MEASUREMENT_INFO[c.measurement];
		let canon: number;
		if (c.measurement === 'vacuum_hold' && isPressure(unit)) {
			const applied = parseDecimal(appliedText);
			if (applied === null || applied <= 0) return { error: `Type the applied vacuum (${unit}) above the column first.` };
			if (n > applied) return { error: `The held vacuum cannot exceed the applied ${applied} ${unit}.` };
			canon = vacuumHoldPercent(pressureToKpa(applied, unit as 'kPa' | 'inHg'), pressureToKpa(n, unit as 'kPa' | 'inHg'));
		} else {
			canon = toCanonical(n, unit as Unit);
		}
		const lo = c.measurement === 'stem_diameter' || c.measurement === 'guide_bore' ? 1 : 0;
		if (canon < lo || canon > info.max) return { error: `${info.label} must be between ${lo} and ${info.max} ${info.unit === 'um' ? 'µm' : info.unit === 'pct' ? '%' : info.unit}: check the unit.` };
		if (c.measurement === 'fluid_hold' && !Number.isInteger(canon)) return { error: 'Whole seconds to the first drip.' };
		return { canon };
	}

	/** The person finished a cell (it changed and lost focus, or Enter): check it and save it. */
	commit(key: string) {
		const c = this.cells[key];
		const p = this.parse(c, c.text);
		if ('error' in p) {
			c.status = 'error';
			c.message = p.error;
			return;
		}
		const gauge = this.gauges[c.column] ?? '';
		c.canon = p.canon;
		c.edited = true;
		c.day = this.opts.today;
		c.version++;
		if (p.canon === c.savedCanon && (p.canon === null || (gauge || null) === c.instrumentId)) {
			c.status = 'saved';
			c.message = '';
			c.typed = null;
			this.persist();
			return;
		}
		c.typed = { text: c.text.trim(), unit: this.units[c.column], gauge, applied: this.applied };
		c.status = 'unsaved';
		c.message = '';
		this.persist();
		void this.send(key);
	}

	/** Put a cell back to what the server holds. */
	revert(key: string) {
		const c = this.cells[key];
		c.canon = c.savedCanon;
		c.text = c.column === 'vacuum_hold' && isPressure(this.units.vacuum_hold) ? '' : display(c.savedCanon, this.units[c.column]);
		c.status = 'saved';
		c.message = '';
		c.typed = null;
		this.persist();
	}

	async send(key: string): Promise<void> {
		const c = this.cells[key];
		if (!c?.typed) return;
		if (this.inflight.has(key)) {
			this.again.add(key);
			return;
		}
		this.inflight.add(key);
		const version = c.version;
		const typed = { ...c.typed };
		c.status = 'saving';
		const body = new FormData();
		body.set(`c|${c.pos}|${c.field}`, typed.text);
		body.set(`unit|${c.column}`, typed.unit);
		body.set(`gauge|${c.column}`, typed.gauge);
		if (typed.applied) body.set('applied', typed.applied);
		try {
			const res = await fetch(this.opts.action, { method: 'POST', body, headers: { 'x-sveltekit-action': 'true', accept: 'application/json' } });
			const result = deserialize(await res.text());
			if (result.type === 'success') {
				if (c.version === version) {
					c.status = 'saved';
					c.savedCanon = c.canon;
					c.instrumentId = typed.gauge || null;
					c.typed = null;
					c.message = '';
				}
				const status = (result.data as { status?: string } | undefined)?.status;
				if (status) this.headStatus = status;
				this.attempt = 0;
				this.lastError = '';
			} else if (result.type === 'failure') {
				const d = (result.data ?? {}) as { message?: string; errors?: Record<string, string> };
				const e = d.errors ?? {};
				if (c.version === version) {
					c.status = 'error';
					c.message = e[key] ?? e[`unit:${c.column}`] ?? e[`gauge:${c.column}`] ?? e.applied ?? d.message ?? 'The server refused this value.';
				}
			} else if (result.type === 'error' && (result.status ?? 500) < 500) {
				c.status = 'error';
				c.message = (result.error as { message?: string })?.message ?? `Refused (${result.status}).`;
			} else {
				// A server error, or a redirect to sign in: keep the value and try again.
				c.status = 'unsaved';
				c.message = result.type === 'redirect' ? 'Your session ended: sign in again in another tab; the value is kept.' : 'The server had a problem; retrying.';
				this.lastError = c.message;
				this.scheduleRetry();
			}
		} catch {
			c.status = 'unsaved';
			c.message = 'No connection; retrying.';
			this.lastError = 'No connection to the server.';
			this.scheduleRetry();
		} finally {
			this.inflight.delete(key);
			this.persist();
			if (this.again.delete(key)) void this.send(key);
		}
	}

	/** Send every value the server does not have yet. */
	flush() {
		if (this.timer) clearTimeout(this.timer);
		this.timer = null;
		this.retryIn = null;
		for (const c of Object.values(this.cells)) if (c.status === 'unsaved' && c.typed) void this.send(c.key);
	}

	private scheduleRetry() {
		if (this.timer) return;
		const wait = RETRY_STEPS_MS[Math.min(this.attempt, RETRY_STEPS_MS.length - 1)];
		this.attempt++;
		const at = Date.now() + wait;
		this.retryIn = Math.ceil(wait / 1000);
		if (!this.tick) {
			this.tick = setInterval(() => {
				this.retryIn = this.timer ? Math.max(0, Math.ceil((at - Date.now()) / 1000)) : null;
				if (!this.timer && this.tick) {
					clearInterval(this.tick);
					this.tick = null;
				}
			}, 500);
		}
		this.timer = setTimeout(() => {
			this.timer = null;
			this.flush();
		}, wait);
	}

	/** Values not yet on the server, kept in the browser until they are. */
	persist() {
		if (typeof localStorage === 'undefined') return;
		const keep: Record<string, Typed> = {};
		for (const c of Object.values(this.cells)) if ((c.status === 'unsaved' || c.status === 'saving') && c.typed) keep[c.key] = c.typed;
		try {
			if (Object.keys(keep).length) localStorage.setItem(this.storageKey, JSON.stringify({ saved: Date.now(), cells: keep }));
			else localStorage.removeItem(this.storageKey);
		} catch {
			/* storage full or blocked: the on-screen state still shows what is not saved */
		}
	}

	/** After a reload: the values that had not reached the server, back in their cells and on their way. */
	restore(): number {
		if (typeof localStorage === 'undefined') return 0;
		let stored: { cells?: Record<string, Typed> } | null = null;
		try {
			stored = JSON.parse(localStorage.getItem(this.storageKey) ?? 'null');
		} catch {
			stored = null;
		}
		let n = 0;
		for (const [key, typed] of Object.entries(stored?.cells ?? {})) {
			const c = this.cells[key];
			if (!c) continue;
			this.units[c.column] = typed.unit;
			this.gauges[c.column] = typed.gauge;
			if (typed.applied) this.applied = typed.applied;
			c.text = typed.text;
			const p = this.parse(c, typed.text, typed.unit, typed.applied);
			if ('error' in p) continue;
			c.canon = p.canon;
			c.edited = true;
			c.day = this.opts.today;
			c.typed = typed;
			c.status = 'unsaved';
			c.message = 'Kept from before the page was reloaded; saving.';
			n++;
		}
		if (n) this.flush();
		return n;
	}

	destroy() {
		if (this.timer) clearTimeout(this.timer);
		if (this.tick) clearInterval(this.tick);
	}
}
