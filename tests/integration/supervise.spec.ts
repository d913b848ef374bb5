// npm start's supervision: scripts/start.sh on a throwaway data folder; a killed web server comes
// back by itself while PostgreSQL stays up; SIGINT stops everything within 10 s (the bound).
import { spawn } from 'node:child_process';
import { afterAll, describe, expect, it } from 'vitest';
import { demoCluster, freePort, removeCluster, REPO, waitFor, type Cluster } from '../helpers/cluster';

let cluster: Cluster | undefined;
let startPid: number | undefined;
afterAll(async () => {
	if (startPid) {
		try {
			process.kill(-startPid, 'SIGKILL');
		} catch {
			/* already gone */
		}
	}
	await removeCluster(cluster);
}, 60_000);

const alive = (pid: number) => {
	try {
		process.kill(pid, 0);
		return true;
	} catch {
		return false;
	}
};

describe('npm start supervises the web server', () => {
	it('restarts a killed server, keeps the database up, and stops everything on SIGINT', async () => {
		// Seeded beforehand and stopped, so start.sh starts the cluster itself and skips the seed.
		cluster = await demoCluster('supervise');
		expect((await cluster.pg('stop')).code).toBe(0);
		const port = await freePort();
		const env: NodeJS.ProcessEnv = { ...cluster.env, PORT: String(port), LAPMARK_SMTP_PORT: String(await freePort()) };
		delete env.SMTP_URL;
		const start = spawn('bash', ['scripts/start.sh'], { cwd: REPO, env, detached: true, stdio: ['ignore', 'pipe', 'pipe'] });
		startPid = start.pid;
		let log = '';
		start.stdout.on('data', (d) => (log += d));
		start.stderr.on('data', (d) => (log += d));
		const exited = new Promise<number | null>((r) => start.once('exit', (code) => r(code)));
		const base = `http://127.0.0.1:${port}`;
		const webPids = () => [...log.matchAll(/\[web\] started: .* \(pid (\d+)\)/g)].map((m) => Number(m[1]));

		await waitFor(() => log.includes('ready in'), 120_000, `npm start (log: ${log.slice(-500)})`);
		expect((await fetch(`${base}/api/health`)).status).toBe(200);
		const [first] = webPids();
		expect(alive(first)).toBe(true);

		process.kill(first, 'SIGKILL');
		await waitFor(() => webPids().length === 2, 20_000, 'a second web server');
		const second = webPids()[1];
		expect(second).not.toBe(first);
		await waitFor(async () => (await fetch(`${base}/api/health`)).ok, 30_000, 'the restarted web server');
		expect(log).toContain(`the web server (pid ${first}) exited unexpectedly`);
		expect((await cluster.pg('status')).code).toBe(0);

		const t0 = Date.now();
		process.kill(start.pid!, 'SIGINT');
		const timeout = new Promise<'timeout'>((r) => setTimeout(() => r('timeout'), 10_000));
		expect(await Promise.race([exited, timeout])).not.toBe('timeout');
		expect(Date.now() - t0).toBeLessThan(10_000);
		expect(alive(second)).toBe(false);
		const status = await cluster.pg('status');
		expect(status.stdout.trim()).toBe('stopped');
		startPid = undefined;
	}, 240_000);
});
