// An audit entry as a sentence a person reads ("engineer@… changed the final exhaust clearance
// limit of ALDER-4 from at most 0.120 to at most 0.110 mm, effective 2 Dec 2026"). The entry's
// before and after stay as they were written; this only words them, and anything it does not
// know is worded plainly from the kind of record and the change.
import { DECISION_LABEL, MEASUREMENTS, MEASUREMENT_INFO, UNIT_LABEL, type DecisionKind, type Measurement, type Unit } from '../../measurements';
import { STATUS_LABEL } from '../../schemas/heads';
import { count, fmtLimits, fmtWithUnit } from '../../format';

export interface AuditEntryLike {
	actorLabel: string;
	/** The actor's name today, when known: it reads better than the e-mail kept as the label. */
	actorName?: string | null;
	entity: string;
	action: string;
	before: unknown;
	after: unknown;
}

type Bag = Record<string, unknown>;

const bag = (v: unknown): Bag => (v && typeof v === 'object' && !Array.isArray(v) ? (v as Bag) : {});
const str = (v: unknown): string | null => (typeof v === 'string' && v !== '' ? v : null);
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const isMeasurement = (v: unknown): v is Measurement => typeof v === 'string' && (MEASUREMENTS as readonly string[]).includes(v);

const DAY = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', timeZone: 'UTC' });
/** "2026-12-02" → "2 Dec 2026"; anything else as it is. */
export function longDay(v: unknown): string {
	const s = str(v);
	if (!s || !/^\d{4}-\d{2}-\d{2}/.test(s)) return s ?? '';
	return DAY.format(new Date(`${s.slice(0, 10)}T00:00:00Z`));
}

const STAGE_WORD: Record<string, string> = { as_received: 'as-received', final: 'final' };
const ENTITY_WORD: Record<string, string> = {
	api_token: 'API token',
	bore_reading: 'bore reading',
	comeback: 'comeback',
	control_baseline: 'control-chart baseline',
	decision: 'decision',
	family: 'engine family',
	head: 'head',
	head_report: 'head report',
	import: 'import',
	instrument: 'gauge',
	invitation: 'invitation',
	limit: 'limit',
	membership: 'membership',
	reading: 'reading',
	shop: 'shop',
	shop_settings: 'shop settings'
};
const VERB: Record<string, string> = {
	create: 'added',
	update: 'changed',
	delete: 'deleted',
	undo: 'undid',
	override: 'overrode',
	revoke: 'revoked',
	import: 'imported'
};

function measurementWords(m: unknown): string {
	if (!isMeasurement(m)) return str(m) ?? 'a measurement';
	const label = MEASUREMENT_INFO[m].label;
	return label.charAt(0).toLowerCase() + label.slice(1);
}

/** "the final exhaust clearance limit of ALDER-4" */
function limitName(a: Bag): string {
	const stage = STAGE_WORD[String(a.stage)] ?? '';
	const side = a.side === 'both' ? '' : (str(a.side) ?? '');
	return ['the', stage, side, measurementWords(a.measurement), 'limit', a.family ? `of ${a.family}` : ''].filter(Boolean).join(' ');
}

function limitsText(m: unknown, v: Bag): string {
	const limits = { min: num(v.min), max: num(v.max) };
	return isMeasurement(m) ? fmtLimits(m, limits, true) : `${limits.min ?? '—'} – ${limits.max ?? '—'}`;
}

function valueText(m: unknown, v: unknown): string {
	const x = num(v);
	if (x === null) return '—';
	return isMeasurement(m) ? fmtWithUnit(m, x) : String(x);
}

const unitWord = (u: string) => UNIT_LABEL[u as Unit] ?? u;

/** "as typed: 0.0043 in" when the value was typed in another unit than it is kept in. */
function typedText(m: unknown, typed: unknown): string {
	const t = bag(typed);
	const unit = str(t.unit);
	const text = str(t.text);
	if (!unit || !text || !isMeasurement(m) || unit === MEASUREMENT_INFO[m].unit) return '';
	return ` (typed ${text} ${unitWord(unit)})`;
}

function readingSentence(who: string, action: string, b: Bag, a: Bag, bore = false): string {
	const what = { ...b, ...a };
	const m = bore ? 'guide_bore' : what.measurement;
	const where = [STAGE_WORD[String(what.stage)], measurementWords(m), bore && what.direction ? `(${what.direction}${what.height ? `, ${what.height}` : ''})` : '']
		.filter(Boolean)
		.join(' ');
	const pos = [what.position ? `at ${what.position}` : '', what.head ? `of head ${what.head}` : ''].filter(Boolean).join(' ');
	const key = bore ? 'valueMm' : 'value';
	if (action === 'delete') return `${who} deleted the ${where} reading ${pos}: it was ${valueText(m, b[key])}.`;
	const typed = typedText(m, a.typed);
	if (action === 'update' || (action === 'create' && b[key] !== undefined)) {
		const over = b.fromImport ? ' over the imported value' : '';
		return `${who} changed the ${where} reading ${pos} from ${valueText(m, b[key])} to ${valueText(m, a[key])}${typed}${over}.`;
	}
	return `${who} recorded ${valueText(m, a[key])}${typed} as the ${where} reading ${pos}.`;
}

/** The sentence for one audit entry. */
export function auditSentence(e: AuditEntryLike): string {
	const who = e.actorName?.trim() || e.actorLabel || 'Someone';
	const b = bag(e.before);
	const a = bag(e.after);
	switch (e.entity) {
		case 'limit': {
			const name = limitName(a);
			const effective = a.effectiveFrom ? `, effective ${longDay(a.effectiveFrom)}` : '';
			const note = str(a.note) ? ` (“${a.note}”)` : '';
			const t = bag(a.typed);
			const canonical = isMeasurement(a.measurement) ? MEASUREMENT_INFO[a.measurement].unit : null;
			const typedUnit = str(t.unit);
			const typedOf = (v: unknown) => str(v) ?? (num(v) === null ? null : String(v));
			const [tMin, tMax] = [typedOf(t.min), typedOf(t.max)];
			const typedRange = tMin && tMax ? `${tMin} – ${tMax}` : tMax ? `at most ${tMax}` : `at least ${tMin}`;
			const typed = typedUnit && typedUnit !== canonical && (tMin || tMax) ? `, typed ${typedRange} ${unitWord(typedUnit)}` : '';
			if (e.action === 'update') return `${who} changed ${name} from ${limitsText(a.measurement, b)} to ${limitsText(a.measurement, a)}${typed}${effective}${note}.`;
			return `${who} set ${name} to ${limitsText(a.measurement, a)}${typed}${effective}${note}.`;
		}
		case 'reading':
			return readingSentence(who, e.action, b, a);
		case 'bore_reading':
			return readingSentence(who, e.action, b, a, true);
		case 'head': {
			if (e.action === 'create') {
				const usage = str(a.usageTyped) ? `, ${a.usageTyped}` : '';
				return `${who} took in head ${a.serial ?? ''} (${a.family ?? 'no family'}) for ${a.customer ?? 'no customer'}, received ${longDay(a.receivedOn)}${usage}.`;
			}
			if (e.action === 'override') return `${who} released the head despite open reasons: “${a.reason ?? ''}”.`;
			const from = STATUS_LABEL[b.status as keyof typeof STATUS_LABEL] ?? str(b.status);
			const to = STATUS_LABEL[a.status as keyof typeof STATUS_LABEL] ?? str(a.status);
			if (from && to) return `${who} moved the head from ${from.toLowerCase()} to ${to.toLowerCase()}${a.releasedOn ? ` on ${longDay(a.releasedOn)}` : ''}.`;
			break;
		}
		case 'decision': {
			const kind = DECISION_LABEL[a.kind as DecisionKind] ?? str(a.kind) ?? 'a decision';
			const at = `${a.position ? ` for ${a.position}` : ''}${a.head ? ` of head ${a.head}` : ''}`;
			const against = a.overridesSuggestion && a.suggested ? ` instead of the suggested “${DECISION_LABEL[a.suggested as DecisionKind] ?? a.suggested}”` : '';
			if (e.action === 'update' && b.kind) return `${who} changed the decision${at} from “${DECISION_LABEL[b.kind as DecisionKind] ?? b.kind}” to “${kind}”${against}.`;
			return `${who} decided “${kind}”${at}${against}.`;
		}
		case 'comeback':
			return `${who} recorded head ${a.comeback ?? ''} as a comeback of ${a.original ?? ''}, returned ${longDay(a.returnedOn)}: “${a.whatFailed ?? ''}”.`;
		case 'membership': {
			if (e.action === 'update') return `${who} changed a member’s role from ${b.role} to ${a.role}.`;
			if (e.action === 'delete') return `${who} removed a member (${b.role}) from the shop.`;
			return `${who} joined as ${a.role}${a.via ? ` (by ${a.via})` : ''}.`;
		}
		case 'invitation':
			if (e.action === 'revoke') return `${who} withdrew the invitation to ${b.email}.`;
			return `${who} invited ${a.email} as ${a.role}.`;
		case 'api_token':
			if (e.action === 'revoke') return `${who} revoked the API token “${b.name}” (${b.prefix}…).`;
			return `${who} made the API token “${a.name}” (${a.role}${a.expiresAt ? `, until ${longDay(a.expiresAt)}` : ''}).`;
		case 'instrument': {
			if (e.action === 'create') return `${who} added the gauge “${a.name}” (serial ${a.serial}), calibrated ${longDay(a.calibratedOn)}.`;
			if ('retired' in a) return `${who} ${a.retired ? 'retired' : 'returned to use'} a gauge.`;
			return `${who} recorded a calibration on ${longDay(a.calibratedOn)} (every ${a.intervalDays} days).`;
		}
		case 'shop_settings':
			return `${who} set the seal pass marks: vacuum hold at least ${a.vacuumHoldPassPct} %, fluid hold at least ${a.fluidHoldPassSeconds} s.`;
		case 'import':
			if (e.action === 'undo') return `${who} undid an import: ${a.readingsRemoved ?? 0} readings and ${a.headsRemoved ?? 0} heads removed.`;
			if (e.action === 'import' && num(a.readings) !== null) {
				const name = str(a.fileName) ? ` “${a.fileName}”` : '';
				const n = (k: string) => count(num(a[k]) ?? 0);
				return `${who} imported${name}: ${n('readings')} readings from ${n('accepted')} rows (${n('rejected')} rows refused, ${n('createdHeads')} heads added).`;
			}
			break;
		case 'head_report':
			return `${who} sent the report of head ${a.head} to ${a.to}.`;
		case 'family':
			if (e.action === 'create') return `${who} added the engine family ${a.code}.`;
			return `${who} changed the engine family ${a.code ?? b.code ?? ''}.`;
		case 'control_baseline':
			return `${who} ${e.action === 'update' ? 'recomputed' : 'set'} the control-chart baseline of ${a.family ?? ''} ${STAGE_WORD[String(a.stage)] ?? ''} ${a.side ?? ''} ${measurementWords(a.measurement)} from ${longDay(a.from)} to ${longDay(a.to)}.`.replace(/ {2,}/g, ' ');
		case 'shop':
			return `${who} opened the shop ${a.name ?? ''}.`;
	}
	const thing = ENTITY_WORD[e.entity] ?? e.entity.replace(/_/g, ' ');
	return `${who} ${VERB[e.action] ?? e.action} ${/^[aeiou]/i.test(thing) ? 'an' : 'a'} ${thing}.`;
}
