/**
 * Measurement keys, canonical units and unit conversion. Shared by client and server.
 *
 * Conversions are exact by definition: 1 in = 25.4 mm (international yard and pound
 * agreement, 1959; NIST SP 811), hence 1 µin = 0.0254 µm.
 */

export const MEASUREMENTS = [
	'stem_diameter',
	'guide_bore',
	'clearance',
	'face_runout',
	'seat_runout',
	'seat_width',
	'margin',
	'roughness_ra',
	'vacuum_hold',
	'fluid_hold',
	'leakdown'
] as const;
export type Measurement = (typeof MEASUREMENTS)[number];

export const STAGES = ['as_received', 'final'] as const;
export type Stage = (typeof STAGES)[number];

export const SIDES = ['intake', 'exhaust'] as const;
export type Side = (typeof SIDES)[number];

/** Guide bores are gauged in two directions 90° apart (along and across the head) … */
export const BORE_DIRECTIONS = ['along', 'across'] as const;
export type BoreDirection = (typeof BORE_DIRECTIONS)[number];
/** … at up to three heights of the guide. */
export const BORE_HEIGHTS = ['top', 'middle', 'bottom'] as const;
export type BoreHeight = (typeof BORE_HEIGHTS)[number];

export const ROLES = ['owner', 'engineer', 'machinist', 'viewer'] as const;

/** What can be done with one valve position; the database's decision_kind enum uses this list. */
export const DECISION_KINDS = [
	'reuse',
	'lap',
	'recut_seat',
	'reface_valve',
	'replace_valve',
	'replace_seat',
	'replace_guide',
	'knurl_guide'
] as const;
export type DecisionKind = (typeof DECISION_KINDS)[number];

/** How a decision reads on screen and in reports. */
export const DECISION_LABEL: Record<DecisionKind, string> = {
	reuse: 'Reuse as is',
	lap: 'Lap only',
	recut_seat: 'Recut the seat',
	reface_valve: 'Reface the valve',
	replace_valve: 'Replace the valve',
	replace_seat: 'Replace the seat insert',
	replace_guide: 'Replace the guide',
	knurl_guide: 'Knurl and ream the guide'
};
export type Role = (typeof ROLES)[number];

export type CanonicalUnit = 'mm' | 'um' | 'pct' | 's';
export type Unit = 'mm' | 'in' | 'um' | 'uin' | 'pct' | 's';

export interface MeasurementInfo {
	key: Measurement;
	label: string;
	unit: CanonicalUnit;
	/** Units a value may be entered in; the first is canonical. */
	units: Unit[];
	/** Largest physically plausible value in the canonical unit (anything above is a typo). */
	max: number;
	/** Decimals to show in the canonical unit. */
	decimals: number;
	/**
	 * Bounds the quantity cannot pass whatever the process does (canonical unit): every reading
	 * here is a size, a total indicated runout, a roughness, a time or a share, so none is below 0,
	 * and a share (hold, leakage) is at most 100 %. null: no physical upper bound. Statistics that
	 * could pass them (control limits, usual ranges) are clipped to them; capability treats a
	 * series with a bound as bounded data.
	 */
	bounds: { min: number; max: number | null };
}

export const MEASUREMENT_INFO: Record<Measurement, MeasurementInfo> = {
	stem_diameter: { key: 'stem_diameter', label: 'Stem diameter', unit: 'mm', units: ['mm', 'in'], max: 30, decimals: 3, bounds: { min: 0, max: null } },
	guide_bore: { key: 'guide_bore', label: 'Guide bore', unit: 'mm', units: ['mm', 'in'], max: 30, decimals: 3, bounds: { min: 0, max: null } },
	clearance: { key: 'clearance', label: 'Stem-to-guide clearance', unit: 'mm', units: ['mm', 'in'], max: 1, decimals: 3, bounds: { min: 0, max: null } },
	face_runout: { key: 'face_runout', label: 'Valve face runout (TIR)', unit: 'mm', units: ['mm', 'in'], max: 2, decimals: 3, bounds: { min: 0, max: null } },
	seat_runout: { key: 'seat_runout', label: 'Seat runout (TIR)', unit: 'mm', units: ['mm', 'in'], max: 2, decimals: 3, bounds: { min: 0, max: null } },
	seat_width: { key: 'seat_width', label: 'Seat width', unit: 'mm', units: ['mm', 'in'], max: 10, decimals: 2, bounds: { min: 0, max: null } },
	margin: { key: 'margin', label: 'Valve margin', unit: 'mm', units: ['mm', 'in'], max: 10, decimals: 2, bounds: { min: 0, max: null } },
	roughness_ra: { key: 'roughness_ra', label: 'Surface roughness Ra', unit: 'um', units: ['um', 'uin'], max: 50, decimals: 2, bounds: { min: 0, max: null } },
	vacuum_hold: { key: 'vacuum_hold', label: 'Vacuum hold', unit: 'pct', units: ['pct'], max: 100, decimals: 1, bounds: { min: 0, max: 100 } },
	fluid_hold: { key: 'fluid_hold', label: 'Fluid hold', unit: 's', units: ['s'], max: 3600, decimals: 0, bounds: { min: 0, max: null } },
	leakdown: { key: 'leakdown', label: 'Cylinder leakage', unit: 'pct', units: ['pct'], max: 100, decimals: 1, bounds: { min: 0, max: 100 } }
};

export const UNIT_LABEL: Record<Unit, string> = { mm: 'mm', in: 'in', um: 'µm', uin: 'µin', pct: '%', s: 's' };

/** Factor from an entry unit to its canonical unit. */
const TO_CANONICAL: Record<Unit, { canonical: CanonicalUnit; factor: number }> = {
	mm: { canonical: 'mm', factor: 1 },
	in: { canonical: 'mm', factor: 25.4 },
	um: { canonical: 'um', factor: 1 },
	uin: { canonical: 'um', factor: 0.0254 },
	pct: { canonical: 'pct', factor: 1 },
	s: { canonical: 's', factor: 1 }
};

export function isMeasurement(key: string): key is Measurement {
	return (MEASUREMENTS as readonly string[]).includes(key);
}
export function isUnit(u: string): u is Unit {
	return u in TO_CANONICAL;
}

/** True when `unit` is a valid entry unit for `measurement`. */
export function unitFits(measurement: Measurement, unit: Unit): boolean {
	return MEASUREMENT_INFO[measurement].units.includes(unit);
}

/**
 * Convert a value to the canonical unit. Multiplying by 25.4 or 0.0254 and rounding to 12
 * significant digits gives the decimal result a person computes by hand (0.0025 in → 0.0635 mm,
 * not 0.06349999999999999), which keeps frequency tables of quantised readings exact.
 */
export function toCanonical(value: number, unit: Unit): number {
	const { factor } = TO_CANONICAL[unit];
	if (factor === 1) return value;
	return roundSig(value * factor, 12);
}

export function fromCanonical(value: number, unit: Unit): number {
	const { factor } = TO_CANONICAL[unit];
	if (factor === 1) return value;
	return roundSig(value / factor, 12);
}

export function roundSig(x: number, digits: number): number {
	if (x === 0 || !Number.isFinite(x)) return x;
	return Number.parseFloat(x.toPrecision(digits));
}

/** Normalise a side as shops write it: intake/exhaust/in/ex/i/e in any case. */
/**
 * `x` with `decimals` decimals, or with as many more (up to 4) as it takes not to print it equal
 * to `other` when it differs from it: "0.1004 is over the limit 0.100", never "0.100 … 0.100".
 */
export function fixedApart(x: number, other: number | null | undefined, decimals: number): string {
	let d = decimals;
	while (d < decimals + 4 && other !== null && other !== undefined && x !== other && x.toFixed(d) === other.toFixed(d)) d++;
	return x.toFixed(d);
}

export function parseSide(text: string): Side | null {
	const t = text.trim().toLowerCase();
	if (t === 'intake' || t === 'in' || t === 'i') return 'intake';
	if (t === 'exhaust' || t === 'ex' || t === 'e') return 'exhaust';
	return null;
}

export function parseStage(text: string): Stage | null {
	const t = text.trim().toLowerCase().replace(/[\s-]+/g, '_');
	if (t === 'as_received' || t === 'received' || t === 'ar') return 'as_received';
	if (t === 'final' || t === 'fi') return 'final';
	return null;
}

// ---------------------------------------------------------------------------------------------
// Pressures, distances and the two percentages computed from gauge pressures.

/**
 * Pressure units a gauge may read in, with their size in kPa. 1 psi = 6.894757293168361 kPa
 * (1 lbf = 4.4482216152605 N over (0.0254 m)², both exact: NIST SP 811, B.8); 1 bar = 100 kPa
 * exactly; 1 inHg = 3.386389 kPa (conventional inch of mercury, NIST SP 811, B.8).
 */
export const PRESSURE_UNITS = ['kPa', 'psi', 'bar', 'inHg'] as const;
export type PressureUnit = (typeof PRESSURE_UNITS)[number];
export const KPA_PER: Record<PressureUnit, number> = { kPa: 1, psi: 6.894757293168361, bar: 100, inHg: 3.386389 };

export function pressureToKpa(value: number, unit: PressureUnit): number {
	return unit === 'kPa' ? value : roundSig(value * KPA_PER[unit], 12);
}
export function pressureFromKpa(kpa: number, unit: PressureUnit): number {
	return unit === 'kPa' ? kpa : roundSig(kpa / KPA_PER[unit], 12);
}

/** 1 mile = 1.609344 km exactly (international mile, 1959; NIST SP 811). */
export const KM_PER_MILE = 1.609344;
export const DISTANCE_UNITS = ['km', 'mi'] as const;
export type DistanceUnit = (typeof DISTANCE_UNITS)[number];
/** Kilometres, rounded to the whole kilometre the heads table keeps. */
export function distanceToKm(value: number, unit: DistanceUnit): number {
	return Math.round(unit === 'km' ? value : value * KM_PER_MILE);
}

/**
 * Cylinder leakage from a differential (leak-down) gauge: (in − held) / in × 100, the same in
 * any pressure unit. Rounded to 0.1 %, the gauge's own resolution at best.
 */
export function leakagePercent(pressureIn: number, held: number): number {
	if (!(pressureIn > 0)) throw new RangeError('The pressure in must be above zero.');
	if (!(held >= 0 && held <= pressureIn)) throw new RangeError('The held pressure must be between zero and the pressure in.');
	return Math.round(((pressureIn - held) / pressureIn) * 1000) / 10;
}

/** Bench vacuum test: the share of the applied vacuum the closed valve held, in %, to 0.1 %. */
export function vacuumHoldPercent(applied: number, held: number): number {
	if (!(applied > 0)) throw new RangeError('The applied vacuum must be above zero.');
	if (!(held >= 0 && held <= applied)) throw new RangeError('The held vacuum must be between zero and the applied vacuum.');
	return Math.round((held / applied) * 1000) / 10;
}

/**
 * A number as people type it into a measuring form: digits with one decimal point or comma,
 * optional leading zero ("0.3125", ".3125", "7,062"). Null for anything else (signs,
 * exponents, thousands separators, text): a reading is never guessed at.
 */
export function parseDecimal(text: string): number | null {
	const t = text.trim();
	if (!/^(\d+([.,]\d*)?|[.,]\d+)$/.test(t)) return null;
	const n = Number(t.replace(',', '.'));
	return Number.isFinite(n) ? n : null;
}
