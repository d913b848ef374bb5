// Deterministic helpers of the demo: seeds, random numbers, ids, day numbers and quantising.
import { createHash } from 'node:crypto';
import { randomLcg, randomNormal } from 'd3-random';
import { DAY_MS, dayNumber, dayOfNumber } from '../../domain/days';

/** 32-bit FNV-1a over the parts, finished with a murmur mix: seeds per shop and per head. */
export function mix(...parts: (string | number)[]): number {
	let h = 0x811c9dc5;
	for (const p of parts) {
		const s = String(p);
		for (let i = 0; i < s.length; i++) {
			h ^= s.charCodeAt(i);
			h = Math.imul(h, 0x01000193);
		}
		h ^= 0x7c;
		h = Math.imul(h, 0x01000193);
	}
	h ^= h >>> 16;
	h = Math.imul(h, 0x85ebca6b);
	h ^= h >>> 13;
	h = Math.imul(h, 0xc2b2ae35);
	h ^= h >>> 16;
	return h >>> 0;
}

/** Seeded random numbers (d3-random's LCG): uniform, normal, log-normal, picks. */
export class Rng {
	readonly u: () => number;
	private readonly z: () => number;
	constructor(seed: number) {
		this.u = randomLcg(seed);
		this.z = randomNormal.source(this.u)(0, 1);
	}
	n(mu: number, sd: number): number {
		return mu + sd * this.z();
	}
	/** Log-normal factor with median 1. */
	ln(sigma: number): number {
		return Math.exp(sigma * this.z());
	}
	int(lo: number, hi: number): number {
		return lo + Math.floor(this.u() * (hi - lo + 1));
	}
	range(lo: number, hi: number): number {
		return lo + this.u() * (hi - lo);
	}
	chance(p: number): boolean {
		return this.u() < p;
	}
	pick<T>(xs: readonly T[]): T {
		return xs[Math.floor(this.u() * xs.length)];
	}
	weighted<T extends { weight: number }>(xs: readonly T[]): T {
		let r = this.u() * xs.reduce((s, x) => s + x.weight, 0);
		for (const x of xs) {
			r -= x.weight;
			if (r < 0) return x;
		}
		return xs[xs.length - 1];
	}
}

/** A UUID-shaped id from a hash of the seed and a stable key (version 4 and variant bits set). */
export function uuidOf(seed: number, key: string): string {
	const h = createHash('sha256').update(`${seed}|${key}`).digest('hex');
	const v = ((parseInt(h[16], 16) & 0x3) | 0x8).toString(16);
	return `${h.slice(0, 8)}-${h.slice(8, 12)}-4${h.slice(13, 16)}-${v}${h.slice(17, 20)}-${h.slice(20, 32)}`;
}

/** The day number of a YYYY-MM-DD option, checked. */
export function dayOf(iso: string): number {
	if (!/^\d{4}-\d{2}-\d{2}$/.test(iso)) throw new RangeError(`endDate must be YYYY-MM-DD, got ${iso}`);
	const d = dayNumber(iso);
	if (Number.isNaN(d)) throw new RangeError(`endDate is not a date: ${iso}`);
	return d;
}
export const dateOf = dayOfNumber;
export function stampOf(day: number, seconds: number): string {
	return new Date(day * DAY_MS + seconds * 1000).toISOString();
}
export function weekday(day: number): number {
	return new Date(day * DAY_MS).getUTCDay();
}
/** Moves a working-day event off the weekend (Saturday and Sunday go to Monday). */
export function workday(day: number): number {
	const w = weekday(day);
	return w === 6 ? day + 2 : w === 0 ? day + 1 : day;
}

// Quantise at the gauge's resolution. Dividing an integer by a power of ten gives the double
// nearest the decimal, the same value PostgreSQL parses from the text.
export const q3 = (x: number) => Math.round(x * 1000) / 1000;
export const q2 = (x: number) => Math.round(x * 100) / 100;
export const q1 = (x: number) => Math.round(x * 10) / 10;
export const qHalf = (x: number) => Math.round(x * 2) / 2;
export const um = (x: number) => Math.round(x * 1000);
export const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));
export const fmt3 = (x: number) => x.toFixed(3);
export const fmt2 = (x: number) => x.toFixed(2);
