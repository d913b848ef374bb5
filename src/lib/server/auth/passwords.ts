// Password hashing with bcrypt (bcryptjs: pure JavaScript, so nothing native to build or
// download on install). Cost 10 ≈ 0.05–0.1 s per hash on this class of machine.
import bcrypt from 'bcryptjs';

const COST = 10;

export function hashPassword(plain: string): Promise<string> {
	return bcrypt.hash(plain, COST);
}

export function verifyPassword(plain: string, hash: string | null | undefined): Promise<boolean> {
	// Compare against a fixed hash when there is none, so an unknown address takes as long.
	return bcrypt.compare(plain, hash ?? DUMMY_HASH);
}

const DUMMY_HASH = '$2b$10$C6UzMDM.H6dfI/f/IKxGhuW0qZ6T7fH8f3Y2Q0d3nCkq9lJ3m4P6e';
