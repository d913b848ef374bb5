// Starts the built app (`node server.js`, the entry around build/handler.js) against the test database for the browser tests.
import { spawn, type ChildProcess } from 'node:child_process';
import type { TestProject } from 'vitest/node';

declare module 'vitest' {
	export interface ProvidedContext {
		baseURL: string;
	}
}

let server: ChildProcess | null = null;

export default async function setup(project: TestProject) {
	const port = Number(process.env.LAPMARK_TEST_PORT ?? 3100);
	const baseURL = `http://127.0.0.1:${port}`;
	server = spawn('node', ['server.js'], {
		env: { ...process.env, PORT: String(port), HOST: '127.0.0.1', ORIGIN: baseURL, BODY_SIZE_LIMIT: 'Infinity', LAPMARK_DEMO: '1' },
		stdio: ['ignore', 'inherit', 'inherit']
	});
	const deadline = Date.now() + 30_000;
	for (;;) {
		try {
			const res = await fetch(`${baseURL}/api/health`);
			if (res.ok) break;
		} catch {
			/* not up yet */
		}
		if (Date.now() > deadline) throw new Error(`the app did not start on ${baseURL}`);
		await new Promise((r) => setTimeout(r, 200));
	}
	project.provide('baseURL', baseURL);
	return async () => {
		if (!server || server.exitCode !== null || server.signalCode !== null) return;
		const exited = new Promise((r) => server?.once('exit', r));
		server.kill('SIGTERM');
		const timer = setTimeout(() => server?.kill('SIGKILL'), 10_000);
		await exited;
		clearTimeout(timer);
	};
}
