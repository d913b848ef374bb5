// A fixed-size sieve of the reading keys a file has shown so far, to find possible duplicates
// within the file without keeping every key.

/**
 * Remembers reading keys in a fixed 16 MB bit table (a Bloom filter with two hashes): a key whose
 * bits are both set already may be a duplicate within the file and is marked for an exact check in
 * SQL. Memory stays flat however large the file; a false alarm only costs that exact check.
 */
export class KeySieve {
	private bits = new Uint32Array(1 << 22); // 2^27 bits
	// Two FNV-1a hashes (different offset bases), each finished with MurmurHash3's mixer so that
	// the bits used as the index depend on every character. A key is a row's identity columns
	// followed by a measurement: the identity part is hashed once per row.
	private r1 = 0;
	private r2 = 0;
	row(prefix: string) {
		let h1 = 0x811c9dc5;
		let h2 = 0x050c5d1f;
		for (let i = 0; i < prefix.length; i++) {
			const c = prefix.charCodeAt(i);
			h1 = Math.imul(h1 ^ c, 0x01000193);
			h2 = Math.imul(h2 ^ c, 0x01000193);
		}
		this.r1 = h1;
		this.r2 = h2;
	}
	/** Notes the row's key for this measurement; true when it may have been seen before. */
	add(measurement: string): boolean {
		let h1 = this.r1;
		let h2 = this.r2;
		for (let i = 0; i < measurement.length; i++) {
			const c = measurement.charCodeAt(i);
			h1 = Math.imul(h1 ^ c, 0x01000193);
			h2 = Math.imul(h2 ^ c, 0x01000193);
		}
		const a = this.set(mix(h1));
		const b = this.set(mix(h2));
		return a && b;
	}
	private set(h: number): boolean {
		const idx = h & ((1 << 27) - 1);
		const word = idx >>> 5;
		const bit = 1 << (idx & 31);
		const had = (this.bits[word] & bit) !== 0;
		this.bits[word] |= bit;
		return had;
	}
}

/** MurmurHash3's 32-bit finaliser. */
function mix(h: number): number {
	h ^= h >>> 16;
	h = Math.imul(h, 0x85ebca6b);
	h ^= h >>> 13;
	h = Math.imul(h, 0xc2b2ae35);
	return (h ^ (h >>> 16)) >>> 0;
}
