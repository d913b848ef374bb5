// Liveness: does the database answer, within two seconds?
import { sql } from '../db';

export async function databaseAnswers(timeoutMs = 2000): Promise<boolean> {
	let timer: ReturnType<typeof setTimeout> | undefined;
	try {
		await Promise.race([sql`select 1`, new Promise((_, reject) => (timer = setTimeout(() => reject(new Error('timeout')), timeoutMs)))]);
		return true;
	} catch {
		return false;
	} finally {
		clearTimeout(timer);
	}
}
