// The invented catalogue behind the demo: two shops with their people, engine families and
// customers, the complaints heads come in with, the gauges, and the trade's usual limits.
import type { Measurement, Role, Side } from '../../measurements';
import type { ShopRow } from './types';

export interface FamilyTemplate {
	code: string;
	description: string;
	cylinders: number;
	intakeValves: number;
	exhaustValves: number;
	intakeStemMm: number;
	exhaustStemMm: number;
	/** Serial prefix. */
	prefix: string;
	/** Share of the shop's jobs. */
	weight: number;
	/** Guide wear multiplier: > 1.5 marks the families that wear clearly worse. */
	wear: number;
	diesel: boolean;
}

export interface ShopTemplate {
	slug: string;
	name: string;
	serialPrefix: string;
	settings: ShopRow['settings'];
	users: Record<Role, string>;
	/** Other people who measure; the machinist user is added in front. */
	machinists: string[];
	families: FamilyTemplate[];
	customers: string[];
	/** Family whose limits get a tighter second version about a year before the end date. */
	tightened: string | null;
	/** Instrument kind that is overdue for calibration at the end date. */
	overdue: string;
}

export const SHOP_TEMPLATES: readonly ShopTemplate[] = [
	{
		slug: 'brackenford',
		name: 'Brackenford Head Works',
		serialPrefix: 'BF',
		settings: { onReject: 'skip', fluidHoldPassSeconds: 120, vacuumHoldPassPct: 90 },
		users: {
			owner: 'Odile Brannock',
			engineer: 'Tomasz Ferrwood',
			machinist: 'Ines Halloway-Pike',
			viewer: 'Rufus Ambery'
		},
		machinists: ['Bram Oyelaran', 'Cosmo Lindqvar', 'Wren Moffatby'],
		families: [
			{ code: 'ALDER-4', description: 'Inline four, 16 valves, petrol', cylinders: 4, intakeValves: 2, exhaustValves: 2, intakeStemMm: 5.5, exhaustStemMm: 5.5, prefix: 'ALD', weight: 0.25, wear: 0.9, diesel: false },
			{ code: 'BIRCH-6', description: 'Inline six, 12 valves, petrol, pushrod', cylinders: 6, intakeValves: 1, exhaustValves: 1, intakeStemMm: 7.0, exhaustStemMm: 7.0, prefix: 'BIR', weight: 0.15, wear: 1.85, diesel: false },
			{ code: 'CEDAR-V8', description: 'V8, both banks as one job, 16 valves, petrol', cylinders: 8, intakeValves: 1, exhaustValves: 1, intakeStemMm: 8.0, exhaustStemMm: 8.0, prefix: 'CED', weight: 0.12, wear: 1.0, diesel: false },
			{ code: 'DOGWOOD-4D', description: 'Inline four, 16 valves, diesel', cylinders: 4, intakeValves: 2, exhaustValves: 2, intakeStemMm: 7.0, exhaustStemMm: 7.0, prefix: 'DOG', weight: 0.2, wear: 0.85, diesel: true },
			{ code: 'ELM-3', description: 'Inline three, 12 valves, petrol', cylinders: 3, intakeValves: 2, exhaustValves: 2, intakeStemMm: 5.0, exhaustStemMm: 5.0, prefix: 'ELM', weight: 0.13, wear: 0.95, diesel: false },
			{ code: 'FIR-6D', description: 'Inline six, 24 valves, diesel', cylinders: 6, intakeValves: 2, exhaustValves: 2, intakeStemMm: 8.0, exhaustStemMm: 8.0, prefix: 'FIR', weight: 0.15, wear: 1.65, diesel: true }
		],
		customers: [
			'Quillby Lane Garage',
			'Saltmarsh Parcel Fleet',
			'Pennywhistle Auto Repair',
			'Orchard Row Motors',
			'Brackenford Haulage',
			'Kestrel Hill Garage',
			'Lowmoor Depot Buses',
			'Fernhollow Taxi Co-op',
			'Stonewick Council Fleet',
			'Marram Coast Couriers',
			'Thistledown Farm Machinery',
			'Copperbeck Club Racing'
		],
		tightened: 'FIR-6D',
		overdue: 'dial_indicator'
	},
	{
		slug: 'saltmarsh',
		name: 'Saltmarsh Valve Works',
		serialPrefix: 'SM',
		settings: { onReject: 'abort', fluidHoldPassSeconds: 120, vacuumHoldPassPct: 90 },
		users: {
			owner: 'Priya Castellane-Rowe',
			engineer: 'Jonah Fairleigh-Osei',
			machinist: 'Matteo Quillan',
			viewer: 'Samir Oakhurst'
		},
		machinists: ['Lotte Brenwick', 'Kofi Marrable', 'Ysolde Penhallow'],
		families: [
			{ code: 'GINKGO-4', description: 'Inline four, 8 valves, petrol', cylinders: 4, intakeValves: 1, exhaustValves: 1, intakeStemMm: 6.0, exhaustStemMm: 6.0, prefix: 'GIN', weight: 0.35, wear: 0.9, diesel: false },
			{ code: 'HAZEL-5', description: 'Inline five, 20 valves, petrol', cylinders: 5, intakeValves: 2, exhaustValves: 2, intakeStemMm: 6.0, exhaustStemMm: 6.0, prefix: 'HAZ', weight: 0.2, wear: 1.05, diesel: false },
			{ code: 'JUNIPER-6D', description: 'Inline six, 24 valves, diesel', cylinders: 6, intakeValves: 2, exhaustValves: 2, intakeStemMm: 7.0, exhaustStemMm: 7.0, prefix: 'JUN', weight: 0.3, wear: 1.0, diesel: true },
			{ code: 'LARCH-8', description: 'V8, both banks as one job, 16 valves, petrol', cylinders: 8, intakeValves: 1, exhaustValves: 1, intakeStemMm: 8.0, exhaustStemMm: 8.0, prefix: 'LAR', weight: 0.15, wear: 0.95, diesel: false }
		],
		customers: [
			'Eelgrass Marine Engines',
			'Shingle Point Garage',
			'Greyheron Taxi Co-op',
			'Ropewalk Motors',
			'Oyster Creek Haulage',
			'Lanternfish Couriers',
			'Driftwood Auto Clinic',
			'Breakwater Bus Depot',
			'Tidemill Farm Services',
			'Sandpiper School Buses'
		],
		tightened: null,
		overdue: 'bore_gauge'
	}
];

export const COMPLAINTS = [
	'Blue smoke on start-up',
	'Loss of power, rough idle',
	'Failed leak-down test',
	'Oil consumption above 1 L per 1000 km',
	'Ticking from the valve train',
	'Overheated; head gasket failed',
	'Misfire under load',
	'Routine rebuild at overhaul interval',
	'Coolant loss, suspected head gasket',
	'Hard starting when hot',
	'Burnt exhaust valve suspected',
	'Low compression on one cylinder'
];
export const COMEBACK_COMPLAINTS = [
	'Comeback: oil consumption returned',
	'Comeback: misfire after a few weeks',
	'Comeback: leak-down failed on recheck',
	'Comeback: ticking from the valve train',
	'Comeback: blue smoke on start-up again'
];

export interface InstrumentTemplate {
	kind: string;
	name: string;
	code: string;
	resolutionMm: number | null;
	intervalDays: number;
}
export const INSTRUMENTS: readonly InstrumentTemplate[] = [
	{ kind: 'micrometer', name: 'Outside micrometer 0–25 mm', code: 'MIC', resolutionMm: 0.001, intervalDays: 365 },
	{ kind: 'bore_gauge', name: 'Small-hole gauge set', code: 'BOR', resolutionMm: 0.001, intervalDays: 180 },
	{ kind: 'dial_indicator', name: 'Dial indicator on concentricity stand', code: 'DIA', resolutionMm: 0.001, intervalDays: 365 },
	{ kind: 'caliper', name: 'Seat and margin caliper', code: 'CAL', resolutionMm: 0.01, intervalDays: 365 },
	{ kind: 'roughness_tester', name: 'Surface roughness tester', code: 'RGH', resolutionMm: 0.00001, intervalDays: 365 },
	{ kind: 'vacuum_tester', name: 'Valve vacuum tester', code: 'VAC', resolutionMm: null, intervalDays: 365 }
];
// Which gauge takes which reading. Clearance is computed from bore and stem, and the fluid test
// is timed, so neither has a gauge of its own.
export const INSTRUMENT_FOR: Partial<Record<Measurement, string>> = {
	stem_diameter: 'micrometer',
	guide_bore: 'bore_gauge',
	face_runout: 'dial_indicator',
	seat_runout: 'dial_indicator',
	seat_width: 'caliper',
	margin: 'caliper',
	roughness_ra: 'roughness_tester',
	vacuum_hold: 'vacuum_tester'
};

// New stems are undersize of the nominal by this much; exhaust stems run looser (hotter).
export const STEM_OFFSET: Record<Side, number> = { intake: 0.025, exhaust: 0.045 };
export const CLEARANCE_NEW: Record<Side, [number, number]> = { intake: [0.025, 0.065], exhaust: [0.04, 0.08] };
export const CLEARANCE_SERVICE_MAX: Record<Side, number> = { intake: 0.1, exhaust: 0.12 };
export const SEAT_WIDTH: Record<Side, [number, number]> = { intake: [1.0, 1.6], exhaust: [1.4, 2.3] };
export const MARGIN_MIN: Record<Side, number> = { intake: 0.8, exhaust: 1.0 };
