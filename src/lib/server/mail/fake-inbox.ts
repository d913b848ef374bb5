// Reads what the local fake mail server kept (scripts/mail-fake.ts), newest first.
import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';

export interface FakeMessage {
	id: string;
	receivedAt: string;
	from: string;
	to: string[];
	subject: string;
	text: string;
	html: string;
}

export async function listFakeMail(dir: string): Promise<FakeMessage[]> {
	let names: string[];
	try {
		names = await readdir(dir);
	} catch {
		return [];
	}
	const files = names.filter((n) => n.endsWith('.json')).sort().reverse();
	const all = await Promise.all(files.map(async (f) => JSON.parse(await readFile(join(dir, f), 'utf8')) as FakeMessage));
	return all;
}

export async function readFakeMail(dir: string, id: string): Promise<FakeMessage | null> {
	if (!/^[\w-]+$/.test(id)) return null;
	try {
		return JSON.parse(await readFile(join(dir, `${id}.json`), 'utf8')) as FakeMessage;
	} catch {
		return null;
	}
}

/** Links in a message's text, for following a sign-in or invitation link. */
export function linksIn(text: string): string[] {
	return [...text.matchAll(/https?:\/\/[^\s<>"]+/g)].map((m) => m[0]);
}
