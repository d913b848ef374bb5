// The papaparse side of the import: the delimiter guessed from the start of the file, and the
// file's rows a parsed chunk at a time, with the upload paused while the caller works.
import { Readable } from 'node:stream';
import Papa from 'papaparse';

const DELIMITERS = [',', ';', '\t', '|'];

/** The delimiter, as papaparse guesses it from the first lines; with a single line, the
 * candidate that splits the header most (papaparse needs two rows to compare). */
export function guessDelimiter(start: string): string {
	const lines = start.split(/\r?\n/).slice(0, 10);
	if (lines.length > 2) {
		const guess = Papa.parse(lines.join('\n'), { preview: 10, delimitersToGuess: DELIMITERS });
		if (guess.meta.delimiter && DELIMITERS.includes(guess.meta.delimiter)) return guess.meta.delimiter;
	}
	const header = lines[0];
	const counts = DELIMITERS.map((d) => header.split(d).length);
	const best = Math.max(...counts);
	return best > 1 ? DELIMITERS[counts.indexOf(best)] : ',';
}

/**
 * The rows of the CSV, one chunk of text at a time: papaparse parses each chunk of the upload as
 * it arrives and hands over all its rows at once. Parsing and the upload wait (paused) while the
 * caller works through a batch, so the file is never held in memory. Returns null at the end.
 */
export function csvBatches(feed: Readable, delimiter: string): () => Promise<string[][] | null> {
	const batches: string[][][] = [];
	let parser: Papa.Parser | null = null;
	let finished = false;
	let failure: unknown = null;
	let wake: (() => void) | null = null;
	const notify = () => {
		const w = wake;
		wake = null;
		w?.();
	};
	Papa.parse<string[]>(feed, {
		delimiter,
		header: false,
		skipEmptyLines: false, // blank lines count, so line numbers match the file
		chunk(results, p) {
			parser = p;
			p.pause();
			feed.pause();
			if (results.data.length) batches.push(results.data);
			notify();
		},
		complete() {
			finished = true;
			notify();
		},
		error(e) {
			failure = e;
			notify();
		}
	});
	return async () => {
		for (;;) {
			if (failure) throw failure;
			const batch = batches.shift();
			if (batch) return batch;
			if (finished) return null;
			const woken = new Promise<void>((resolve) => (wake = resolve));
			if (parser) {
				const p: Papa.Parser = parser;
				parser = null;
				p.resume();
				feed.resume();
			}
			await woken;
		}
	};
}

/** Enough of the start of the file to see its delimiter: a few lines, or all of a small file. */
export async function readStart(chunks: AsyncGenerator<string>): Promise<string> {
	let text = '';
	while (text.length < 65_536 && (text.match(/\n/g)?.length ?? 0) < 5) {
		const next = await chunks.next();
		if (next.done) break;
		text += next.value;
	}
	return text;
}

/** The text of the file again from its start: `start` (already read), then the rest of `chunks`. */
export function feedFrom(start: string, chunks: AsyncGenerator<string>): Readable {
	return Readable.from(
		(async function* () {
			yield start;
			for await (const c of chunks) yield c;
		})(),
		{ objectMode: false, encoding: 'utf8' }
	);
}

/** A row of cells as the file would hold it, for a rejected row's record. */
export function unparseRow(cells: string[], delimiter: string): string {
	return Papa.unparse([cells], { delimiter, newline: '' });
}
