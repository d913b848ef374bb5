// The file's rows, as they stream in: each is checked (import/rows.ts) and written, through the
// one COPY channel of the transaction, straight into readings (the readings of a head the file
// creates, keys not seen before in the file) or into the staging table (rows of stored heads,
// possible duplicates within the file, rejected rows, and every row the staged way).
import type { ScopedSql } from '../db/scope';
import { CopyChannel, directReadings, stagedReadings, stagedReject } from './copy-channel';
import { unparseRow } from './csv-stream';
import type { HeaderPlan } from './header';
import { KeySieve } from './key-sieve';
import { checkRow, type RowContext } from './rows';
import { DirectLines, noteNewHead, type Tally } from './tally';
import { ImportInputError } from './text';
import type { OnReject } from './types';

export interface RowsInput {
	shopId: string;
	batchId: string | null;
	onReject: OnReject;
	plan: HeaderPlan;
	ctx: RowContext;
	/** The shop's heads by serial. */
	known: Map<string, { id: string }>;
	delimiter: string;
	/** Readings of new heads go straight into readings; `replica`: in replica mode. */
	direct: boolean;
	replica: boolean;
	/** The first parsed batch (its first row is the header) and the way to the next. */
	first: string[][];
	nextBatch: () => Promise<string[][] | null>;
	/** Told the rows read so far every 25,000 rows. */
	progress: (rows: number) => void;
}

/** Reads every row to the end of the file and ends the COPY; what was seen, for finish. */
export async function writeRows(t: ScopedSql, input: RowsInput): Promise<{ tally: Tally; lines: DirectLines }> {
	const { shopId, batchId, plan, ctx, known, delimiter, direct } = input;
	const familyCodes = new Map([...ctx.families.values()].map((f) => [f.id, f.code]));
	const channel = new CopyChannel(t, input.replica);
	let staged = '';
	let straight = '';
	const flushStaged = () => channel.write('stage', staged).then(() => void (staged = ''));
	const flushStraight = () => channel.write('readings', straight).then(() => void (straight = ''));

	const seen = new KeySieve();
	const lines = new DirectLines();
	const tally: Tally = { goodRows: 0, badRows: 0, goodReadings: 0, dupCandidates: 0, newHeads: new Map() };
	// When rejected rows abort the file, readings stop going straight in at the first reject:
	// all that went in must be deleted again.
	let straightOn = direct;
	const reject = (line: number, reason: string, cells: string[]) => {
		tally.badRows++;
		if (input.onReject === 'abort') straightOn = false;
		staged += stagedReject(line, reason, unparseRow(cells, delimiter));
	};
	const dupFlags: boolean[] = [];
	try {
		let line = 1;
		let rows = 0;
		let batch: string[][] | null = input.first;
		for (let i = 1; batch; batch = await input.nextBatch(), i = 0) {
			for (; i < batch.length; i++) {
				const cells = batch[i];
				line++; // blank lines are kept by the parser so line numbers match the file
				if (channel.error) throw channel.error;
				if (cells.length === 1 && cells[0].trim() === '') continue;
				rows++;
				const r = checkRow(cells, plan, ctx);
				if (!r.ok) {
					reject(line, r.reason, cells);
				} else {
					const g = r.row;
					const knownHead = known.get(g.serial);
					const newHead = knownHead ? undefined : tally.newHeads.get(g.serial);
					if (newHead && newHead.familyId !== g.family.id) {
						// A head has one family: the first row that names the head decides it.
						reject(line, `head ${g.serial} is a ${familyCodes.get(newHead.familyId)} head, not ${g.family.code}`, cells);
					} else {
						const headId = knownHead ? knownHead.id : noteNewHead(tally.newHeads, g);
						tally.goodRows++;
						tally.goodReadings += g.readings.length;
						// A key seen before (or a rare hash collision) is checked exactly in SQL, so the
						// whole row goes through the staging table.
						seen.row(`${g.serial}\u0000${g.stage}\u0000${g.cylinder}\u0000${g.side}\u0000${g.valve}\u0000${g.measuredAt}\u0000`);
						let anyDup = false;
						dupFlags.length = 0;
						for (const m of g.readings) {
							const dup = seen.add(m.measurement);
							dupFlags.push(dup);
							anyDup ||= dup;
						}
						if (straightOn && !knownHead && !anyDup) {
							lines.add(line, g.readings.length);
							straight += directReadings(shopId, headId, g, batchId);
						} else {
							if (anyDup) tally.dupCandidates += dupFlags.filter(Boolean).length;
							staged += stagedReadings(line, headId, g, Boolean(knownHead), dupFlags);
						}
					}
				}
				if (straight.length > 1 << 18) await flushStraight();
				// Staged rows wait in a larger buffer while readings go straight in, so that the
				// connection seldom switches from one COPY to the other.
				if (staged.length > (direct ? 1 << 22 : 1 << 18)) await flushStaged();
				if (batchId && rows % 25_000 === 0) input.progress(rows);
			}
		}
		if (straight) await flushStraight();
		if (staged) await flushStaged();
		await channel.end();
		if (rows === 0) throw new ImportInputError(422, 'The file has a header but no rows.');
	} catch (e) {
		channel.abort(e);
		throw e;
	}
	return { tally, lines };
}
