// API tokens and one-time link secrets: random, URL-safe, stored only as SHA-256 hashes.
// Tokens start with `lmk_` so secret scanners can recognise a leaked one.
import { createHash, randomBytes } from 'node:crypto';

export const TOKEN_PREFIX = 'lmk_';
const TOKEN_SHAPE = /^lmk_[A-Za-z0-9_-]{32,128}$/;

export function newSecret(bytes = 30): string {
	return randomBytes(bytes).toString('base64url');
}

/** A new API token: `lmk_` + 40 URL-safe characters (240 random bits). */
export function newApiToken(): string {
	return TOKEN_PREFIX + newSecret(30);
}

export function looksLikeApiToken(value: string): boolean {
	return TOKEN_SHAPE.test(value);
}

export function sha256Hex(value: string): string {
	return createHash('sha256').update(value).digest('hex');
}

/** What the UI shows of a token after creation: enough to tell tokens apart, never usable. */
export function tokenDisplayPrefix(token: string): string {
	return token.slice(0, 10);
}
