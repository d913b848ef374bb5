// Sample import files for the demo shop `brackenford`: the layouts and units the importer takes,
// plus one file with rows it must reject. New heads only (serials with an S), so importing a
// file adds to the seeded history instead of colliding with it. Deterministic: fixed seed and
// fixed dates, so the committed files regenerate byte for byte.
import { mkdir, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { Rng, SHOP_TEMPLATES, STEM_OFFSET } from './generate';
import type { Side, Stage } from '../../measurements';
import { DAY_MS, dayNumber } from '../../domain/days';

export interface SampleFile {
	name: string;
	/** Data rows, header not counted. */
	rows: number;
	content: string;
}

const SHOP = SHOP_TEMPLATES[0];
const FAMILIES = new Map(SHOP.families.map((f) => [f.code, f]));
const MACHINISTS = [SHOP.users.machinist, ...SHOP.machinists];
// Gauge serials as the seed writes them for this shop.
const BORE_GAUGE = `${SHOP.serialPrefix}-BOR-01`;
const BASE_DAY = dayNumber('2026-11-16');

interface SampleHead {
	serial: string;
	family: string;
	mileage: number;
	customer: string;
	/** Days after BASE_DAY of the as-received inspection. */
	day: number;
	final: boolean;
}

interface PositionValues {
	cylinder: number;
	side: Side;
	valve: number;
	stage: Stage;
	measuredAt: string;
	measuredBy: string;
	/** Micrometres, so clearance is exactly bore − stem. */
	stemUm: number;
	boreUm: number;
	faceRunout: number;
	seatRunout: number;
	seatWidth: number;
	margin: number;
	ra: number;
	vacuum: number;
	fluid: number;
}

const stamp = (day: number, seconds: number) => new Date((BASE_DAY + day) * DAY_MS + seconds * 1000).toISOString().replace('.000Z', 'Z');

/** As-received and (optionally) final readings for every position of one new head. */
function simulate(h: SampleHead, rng: Rng): PositionValues[] {
	const f = FAMILIES.get(h.family);
	if (!f) throw new Error(`unknown family ${h.family}`);
	const out: PositionValues[] = [];
	const fin: PositionValues[] = [];
	const by = rng.pick(MACHINISTS);
	const mk = h.mileage / 100_000;
	const positions: { cylinder: number; side: Side; valve: number }[] = [];
	for (let c = 1; c <= f.cylinders; c++) {
		for (let v = 1; v <= f.intakeValves; v++) positions.push({ cylinder: c, side: 'intake', valve: v });
		for (let v = 1; v <= f.exhaustValves; v++) positions.push({ cylinder: c, side: 'exhaust', valve: v });
	}
	const start = 8 * 3600 + rng.int(0, 4) * 1800;
	positions.forEach((p, i) => {
		const nominal = p.side === 'intake' ? f.intakeStemMm : f.exhaustStemMm;
		const ex = p.side === 'exhaust';
		const wear = Math.min(0.15, 0.0068 * (ex ? 1.6 : 1) * f.wear * rng.ln(0.45) * Math.pow(mk, 1.1));
		const stemUm = Math.round((nominal - STEM_OFFSET[p.side] + rng.n(0, 0.003) - wear * 0.12) * 1000);
		const boreUm = Math.round((nominal + 0.01 + rng.n(0, 0.003) + wear) * 1000);
		const seat = 0.006 + 0.28 * wear + Math.abs(rng.n(0, 0.007));
		const base = { cylinder: p.cylinder, side: p.side, valve: p.valve, measuredBy: by, ra: 0, vacuum: 0, fluid: 0 };
		out.push({
			...base,
			stage: 'as_received',
			measuredAt: stamp(h.day, start + i * 45),
			stemUm,
			boreUm,
			faceRunout: Math.round(Math.abs(rng.n(0.01, 0.006)) * 1000) / 1000,
			seatRunout: Math.round(seat * 1000) / 1000,
			seatWidth: Math.round(((ex ? 1.82 : 1.28) + rng.n(0, 0.07) + 0.05 * mk) * 100) / 100,
			margin: Math.round(((ex ? 1.55 : 1.35) + rng.n(0, 0.07) - 0.03 * mk) * 100) / 100
		});
		if (!h.final) return;
		// Worn guides are replaced and reamed; seats recut; everything lapped and seal-tested.
		const newGuide = (boreUm - stemUm) / 1000 > (ex ? 0.08 : 0.065);
		const fBoreUm = newGuide ? Math.round((nominal + 0.01 + rng.n(0, 0.003)) * 1000) : boreUm + rng.int(-1, 1);
		fin.push({
			...base,
			stage: 'final',
			measuredAt: stamp(h.day + 6, start + i * 50),
			stemUm: stemUm + rng.int(-1, 1),
			boreUm: Math.max(fBoreUm, stemUm + 15),
			faceRunout: 0,
			seatRunout: Math.round((0.004 + Math.abs(rng.n(0.006, 0.005))) * 1000) / 1000,
			seatWidth: Math.round(((ex ? 1.8 : 1.28) + rng.n(0, 0.08)) * 100) / 100,
			margin: 0,
			ra: Math.round(0.13 * rng.ln(0.3) * 100) / 100,
			vacuum: Math.round((100 - Math.abs(rng.n(0, 2))) * 2) / 2,
			fluid: 120
		});
	});
	// As-received rows first, then the final inspection, as a head's sheets are filled in.
	return [...out, ...fin];
}

/** RFC 4180 quoting, for the few fields that need it. */
function csvField(v: string, delimiter: string): string {
	return v.includes(delimiter) || v.includes('"') || v.includes('\n') ? `"${v.replace(/"/g, '""')}"` : v;
}
function csv(rows: string[][], delimiter = ','): string {
	return rows.map((r) => r.map((v) => csvField(v, delimiter)).join(delimiter)).join('\n') + '\n';
}

const WIDE_HEADER = ['head_serial', 'family', 'stage', 'cylinder', 'side', 'valve', 'measured_at', 'measured_by', 'instrument', 'mileage', 'customer'];

function wideRows(heads: SampleHead[], seed: number, unit: 'mm' | 'in'): string[][] {
	const rng = new Rng(seed);
	const rows: string[][] = [];
	for (const h of heads) {
		for (const p of simulate(h, rng)) {
			const lead = [h.serial, h.family, p.stage, String(p.cylinder), p.side, String(p.valve), p.measuredAt, p.measuredBy, BORE_GAUGE, String(h.mileage), h.customer];
			if (unit === 'mm') {
				rows.push([
					...lead,
					(p.stemUm / 1000).toFixed(3),
					(p.boreUm / 1000).toFixed(3),
					((p.boreUm - p.stemUm) / 1000).toFixed(3),
					p.seatRunout.toFixed(3),
					p.seatWidth.toFixed(2)
				]);
			} else {
				// An inch shop reads to 0.0001 in; clearance is bore − stem in those units.
				const stem = Math.round(p.stemUm / 2.54);
				const bore = Math.round(p.boreUm / 2.54);
				rows.push([
					...lead,
					(stem / 10000).toFixed(4),
					(bore / 10000).toFixed(4),
					((bore - stem) / 10000).toFixed(4),
					(Math.round(p.seatRunout / 0.00254) / 10000).toFixed(4),
					(Math.round(p.seatWidth / 0.0254) / 1000).toFixed(3)
				]);
			}
		}
	}
	return rows;
}

const MM_COLUMNS = ['stem_diameter_mm', 'guide_bore_mm', 'clearance_mm', 'seat_runout_mm', 'seat_width_mm'];
const IN_COLUMNS = ['stem_diameter_in', 'guide_bore_in', 'clearance_in', 'seat_runout_in', 'seat_width_in'];

function longFile(): string[][] {
	const heads: SampleHead[] = [
		{ serial: 'ELM26-S0301', family: 'ELM-3', mileage: 164_220, customer: 'Orchard Row Motors', day: 2, final: true },
		{ serial: 'ALD26-S0302', family: 'ALDER-4', mileage: 98_410, customer: 'Kestrel Hill Garage', day: 4, final: true }
	];
	const rng = new Rng(3003);
	const rows: string[][] = [['head_serial', 'family', 'stage', 'cylinder', 'side', 'valve', 'measurement', 'value', 'unit', 'measured_at', 'measured_by']];
	heads.forEach((h, hi) => {
		// The second head comes from an inch bench: lengths in inches, roughness in microinches.
		const inch = hi === 1;
		const len = (mm: number, decimals: number) => (inch ? (Math.round((mm / 25.4) * 10 ** (decimals + 1)) / 10 ** (decimals + 1)).toFixed(decimals + 1) : mm.toFixed(decimals));
		const lu = inch ? 'in' : 'mm';
		for (const p of simulate(h, rng)) {
			const lead = [h.serial, h.family, p.stage, String(p.cylinder), p.side, String(p.valve)];
			const add = (m: string, v: string, unit: string) => rows.push([...lead, m, v, unit, p.measuredAt, p.measuredBy]);
			if (inch) {
				const stem = Math.round(p.stemUm / 2.54);
				const bore = Math.round(p.boreUm / 2.54);
				add('stem_diameter', (stem / 10000).toFixed(4), 'in');
				add('guide_bore', (bore / 10000).toFixed(4), 'in');
				add('clearance', ((bore - stem) / 10000).toFixed(4), 'in');
			} else {
				add('stem_diameter', (p.stemUm / 1000).toFixed(3), 'mm');
				add('guide_bore', (p.boreUm / 1000).toFixed(3), 'mm');
				add('clearance', ((p.boreUm - p.stemUm) / 1000).toFixed(3), 'mm');
			}
			if (p.stage === 'as_received') add('face_runout', len(p.faceRunout, 3), lu);
			add('seat_runout', len(p.seatRunout, 3), lu);
			add('seat_width', len(p.seatWidth, 2), lu);
			if (p.stage === 'as_received') add('margin', len(p.margin, 2), lu);
			if (p.stage === 'final') {
				add('roughness_ra', inch ? String(Math.round(p.ra / 0.0254)) : p.ra.toFixed(2), inch ? 'uin' : 'um');
				add('vacuum_hold', p.vacuum.toFixed(1), 'pct');
				add('fluid_hold', String(p.fluid), 's');
			}
		}
	});
	return rows;
}

function errorsFile(): { rows: string[][]; notes: string[] } {
	const heads: SampleHead[] = [
		{ serial: 'BIR26-S0501', family: 'BIRCH-6', mileage: 212_900, customer: 'Brackenford Haulage', day: 5, final: false },
		{ serial: 'ALD26-S0502', family: 'ALDER-4', mileage: 76_050, customer: 'Quillby Lane Garage', day: 6, final: false },
		{ serial: 'FIR26-S0503', family: 'FIR-6D', mileage: 356_400, customer: 'Marram Coast Couriers', day: 6, final: false }
	];
	const rows = [[...WIDE_HEADER, ...MM_COLUMNS], ...wideRows(heads, 5005, 'mm')];
	const notes: string[] = [];
	// Line numbers count the header as line 1. Each bad row is wrong in exactly one way.
	const spoil = (i: number, change: (r: string[]) => void, why: string) => {
		change(rows[i]);
		notes.push(`line ${i + 1}: ${why}`);
	};
	spoil(4, (r) => ((r[0] = 'OAK26-S0504'), (r[1] = 'OAK-9')), 'unknown family OAK-9');
	spoil(9, (r) => (r[3] = '7'), 'cylinder 7 on a six-cylinder BIRCH-6');
	const stem = rows[16][11];
	spoil(16, (r) => (r[11] = stem.slice(0, -1) + 'O'), `stem_diameter_mm '${stem.slice(0, -1)}O' is not a number (letter O for zero)`);
	spoil(22, (r) => (r[6] = '2099-03-14T09:00:00Z'), 'measured_at in the future');
	// The duplicate repeats the key of the line above with slightly different values.
	const dup = [...rows[27]];
	dup[12] = (Number(dup[12]) + 0.004).toFixed(3);
	dup[13] = (Number(dup[13]) + 0.004).toFixed(3);
	rows.splice(28, 0, dup);
	notes.push('line 29: same head, stage, position and time as line 28 (duplicate key)');
	return { rows, notes };
}

/** The sample files, in memory. */
export function sampleFiles(): SampleFile[] {
	const wideMmHeads: SampleHead[] = [
		{ serial: 'ALD26-S0101', family: 'ALDER-4', mileage: 187_340, customer: 'Saltmarsh Parcel Fleet', day: 0, final: true },
		{ serial: 'FIR26-S0102', family: 'FIR-6D', mileage: 402_115, customer: 'Brackenford Haulage', day: 1, final: true },
		{ serial: 'BIR26-S0103', family: 'BIRCH-6', mileage: 251_800, customer: 'Lowmoor Depot Buses', day: 3, final: false },
		{ serial: 'ELM26-S0104', family: 'ELM-3', mileage: 121_060, customer: 'Pennywhistle Auto Repair', day: 4, final: true }
	];
	const wideInHeads: SampleHead[] = [
		{ serial: 'CED26-S0201', family: 'CEDAR-V8', mileage: 233_700, customer: 'Copperbeck Club Racing', day: 1, final: true },
		{ serial: 'DOG26-S0202', family: 'DOGWOOD-4D', mileage: 318_450, customer: 'Thistledown Farm Machinery', day: 2, final: true }
	];
	const semiHeads: SampleHead[] = [
		{ serial: 'DOG26-S0401', family: 'DOGWOOD-4D', mileage: 276_300, customer: 'Stonewick Council Fleet', day: 3, final: true },
		{ serial: 'ALD26-S0402', family: 'ALDER-4', mileage: 143_980, customer: 'Fernhollow Taxi Co-op', day: 5, final: true }
	];

	const wideMm = [[...WIDE_HEADER, ...MM_COLUMNS], ...wideRows(wideMmHeads, 1001, 'mm')];
	const wideIn = [[...WIDE_HEADER, ...IN_COLUMNS], ...wideRows(wideInHeads, 2002, 'in')];
	const long = longFile();
	// Semicolons between fields, decimal commas inside them, as many European spreadsheets save.
	const semi = [[...WIDE_HEADER, ...MM_COLUMNS], ...wideRows(semiHeads, 4004, 'mm').map((r) => r.map((v, i) => (i >= 11 ? v.replace('.', ',') : v)))];
	const errors = errorsFile();

	const files: SampleFile[] = [
		{ name: 'wide-mm.csv', rows: wideMm.length - 1, content: csv(wideMm) },
		{ name: 'wide-inch.csv', rows: wideIn.length - 1, content: csv(wideIn) },
		{ name: 'long.csv', rows: long.length - 1, content: csv(long) },
		{ name: 'semicolon-decimal-comma.csv', rows: semi.length - 1, content: csv(semi, ';') },
		{ name: 'with-errors.csv', rows: errors.rows.length - 1, content: csv(errors.rows) }
	];
	files.push({ name: 'README.md', rows: 0, content: readme(files, errors.notes) });
	return files;
}

function readme(files: SampleFile[], errorNotes: string[]): string {
	const n = (name: string) => files.find((f) => f.name === name)!.rows;
	return `# Demo import files

Sample CSV files for the demo shop \`brackenford\` (Brackenford Head Works). Every head in them
is new (serials with an \`S\`, such as \`ALD26-S0101\`), so each file adds to the seeded demo.
Families, machinists and the gauge serial are the demo shop's own. Regenerate with
\`npx tsx scripts/seed.ts --samples\`; the output is the same every time.

| file | layout | rows | what it shows |
|---|---|---|---|
| \`wide-mm.csv\` | wide, comma | ${n('wide-mm.csv')} | one row per head × stage × valve position, one column per measurement, millimetres (\`_mm\`); four heads, three with final readings |
| \`wide-inch.csv\` | wide, comma | ${n('wide-inch.csv')} | the same columns in inches (\`_in\`, 0.0001 in; seat width 0.001 in); clearance = bore − stem in inches |
| \`long.csv\` | long, comma | ${n('long.csv')} | one row per reading with \`measurement\`, \`value\`, \`unit\`; one head in mm and µm (\`um\`), one in inches and microinches (\`uin\`); final rows add roughness, vacuum hold (\`pct\`) and fluid hold (\`s\`, 120 = no drip in the 120 s test) |
| \`semicolon-decimal-comma.csv\` | wide, semicolon | ${n('semicolon-decimal-comma.csv')} | as \`wide-mm.csv\`, saved the European way: \`;\` between fields, \`,\` as the decimal mark |
| \`with-errors.csv\` | wide, comma | ${n('with-errors.csv')} | valid rows with ${errorNotes.length} bad ones mixed in (below); with "skip" the rest import, with "abort" nothing does |

Columns of the wide files: \`head_serial, family, stage, cylinder, side, valve, measured_at,
measured_by, instrument, mileage, customer\`, then the measurements. \`stage\` is \`as_received\`
or \`final\`; \`side\` is \`intake\` or \`exhaust\`; \`valve\` numbers the valves of one side in a
cylinder; \`measured_at\` is ISO 8601 in UTC; \`instrument\` is the serial of the bore gauge;
\`mileage\` is in km.

Rejected rows in \`with-errors.csv\` (line 1 is the header):

${errorNotes.map((x) => `- ${x}`).join('\n')}
`;
}

/** Writes the sample files into `dir` (created if missing). */
export async function writeSampleFiles(dir: string): Promise<SampleFile[]> {
	await mkdir(dir, { recursive: true });
	const files = sampleFiles();
	for (const f of files) await writeFile(join(dir, f.name), f.content, 'utf8');
	return files;
}
