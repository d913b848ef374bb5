// Bytes of an upload → UTF-8 text, checked on the way: a size limit, binary content, invalid
// UTF-8; the byte order mark is dropped; a SHA-256 of the exact bytes identifies the file.
import { createHash } from 'node:crypto';
import type { Readable } from 'node:stream';
import { DomainError, type RefusalStatus } from '../errors';

/** A file the import refuses as a whole (too large, not text, no rows): the domain's error, with
 * the status that says which and details the answer carries (the header it read, say). */
export class ImportInputError extends DomainError {
	constructor(status: RefusalStatus, message: string, details: Record<string, unknown> = {}) {
		super(status, message, {}, details);
		this.name = 'ImportInputError';
	}
}

export interface TextSource {
	chunks: AsyncGenerator<string>;
	/** Valid once `chunks` is exhausted. */
	hash(): string;
	bytes(): number;
}

export function textChunks(body: AsyncIterable<Uint8Array> | Readable, limitBytes: number): TextSource {
	const sha = createHash('sha256');
	let bytes = 0;
	let digest = '';
	const decoder = new TextDecoder('utf-8', { fatal: true });
	async function* run(): AsyncGenerator<string> {
		for await (const chunk of body as AsyncIterable<Uint8Array>) {
			bytes += chunk.byteLength;
			if (bytes > limitBytes) {
				throw new ImportInputError(413, `The file is larger than the limit of ${Math.round(limitBytes / 1024 / 1024)} MB.`);
			}
			if (chunk.includes(0)) throw new ImportInputError(415, 'This is not a CSV text file (it contains binary data).');
			sha.update(chunk);
			let text: string;
			try {
				text = decoder.decode(chunk, { stream: true });
			} catch {
				throw new ImportInputError(415, 'The file is not UTF-8 text. Save it as "CSV UTF-8" and try again.');
			}
			if (text) yield text;
		}
		try {
			const tail = decoder.decode();
			if (tail) yield tail;
		} catch {
			throw new ImportInputError(415, 'The file is not UTF-8 text. Save it as "CSV UTF-8" and try again.');
		}
		digest = sha.digest('hex');
	}
	return { chunks: run(), hash: () => digest, bytes: () => bytes };
}
