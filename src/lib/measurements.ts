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
}

export const MEASUREMENT_INFO: Record<Measurement, MeasurementInfo> = {
	stem_diameter: { key: 'stem_diameter', label: 'Stem diameter', unit: 'mm', units: ['mm', 'in'], max: 30, decimals: 3 },
	guide_bore: { key: 'guide_bore', label: 'Guide bore', unit: 'mm', units: ['mm', 'in'], max: 30, decimals: 3 },
	clearance: { key: 'clearance', label: 'Stem-to-guide clearance', unit: 'mm', units: ['mm', 'in'], max: 1, decimals: 3 },
	face_runout: { key: 'face_runout', label: 'Valve face runout (TIR)', unit: 'mm', units: ['mm', 'in'], max: 2, decimals: 3 },
	seat_runout: { key: 'seat_runout', label: 'Seat runout (TIR)', unit: 'mm', units: ['mm', 'in'], max: 2, decimals: 3 },
	seat_width: { key: 'seat_width', label: 'Seat width', unit: 'mm', units: ['mm', 'in'], max: 10, decimals: 2 },
	margin: { key: 'margin', label: 'Valve margin', unit: 'mm', units: ['mm', 'in'], max: 10, decimals: 2 },
	roughness_ra: { key: 'roughness_ra', label: 'Surface roughness Ra', unit: 'um', units: ['um', 'uin'], max: 50, decimals: 2 },
	vacuum_hold: { key: 'vacuum_hold', label: 'Vacuum hold', unit: 'pct', units: ['pct'], max: 100, decimals: 1 },
	fluid_hold: { key: 'fluid_hold', label: 'Fluid hold', unit: 's', units: ['s'], max: 3600, decimals: 0 },
	leakdown: { key: 'leakdown', label: 'Cylinder leakage', unit: 'pct', units: ['pct'], max: 100, decimals: 1 }
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
