// Background work every app server does on its own, started once from the server's `init` hook
// (hooks.server.ts) and stopped on shutdown. Each job is safe to run on several servers sharing
// one database: mail rows are claimed before sending, a dead import is reaped under its lock,
// and warming the overview only reads.
import { db, sql } from './db';
import { env } from './env';
import { reapDeadImports } from './import/batch';
import { retryMail } from './mail';
import { warmOverviews } from './services/overview';

export interface Job {
	name: string;
	/** Milliseconds between runs; a job without one runs once, `firstAfterMs` after the start. */
	everyMs?: number;
	firstAfterMs?: number;
	run(): Promise<unknown>;
}

/** The jobs of a running server. */
export function appJobs(): Job[] {
	return [
		{ name: 'mail', everyMs: 15_000, run: () => retryMail() },
		{
			// Imports whose server died are marked failed by whichever server looks first, so a dead
			// import shows as failed within about 40 s without anyone opening a page.
			name: 'import watch',
			everyMs: env.LAPMARK_IMPORT_WATCH_MS,
			run: async () => {
				const n = await reapDeadImports(sql);
				if (n > 0) console.error(`[import] marked ${n} import${n === 1 ? '' : 's'} that stopped before finishing as failed`);
			}
		},
		// The overview's slowest figure, worked out once per shop in the background after a start.
		{ name: 'overview warm-up', firstAfterMs: 1000, run: () => warmOverviews(db) }
	];
}

export interface Running {
	stop(): void;
}

/** Starts `jobs`: a run never overlaps the job's previous one, an error is logged and the job goes
 * on; the timers do not keep the process alive. */
export function startJobs(jobs: Job[]): Running {
	const timers: ReturnType<typeof setTimeout>[] = [];
	let stopped = false;
	for (const job of jobs) {
		let busy = false;
		const tick = () => {
			if (busy || stopped) return;
			busy = true;
			job
				.run()
				.catch((e) => console.error(`[jobs] ${job.name} failed:`, e instanceof Error ? e.message : e))
				.finally(() => (busy = false));
		};
		const t = job.everyMs ? setInterval(tick, job.everyMs) : setTimeout(tick, job.firstAfterMs ?? 0);
		t.unref();
		timers.push(t);
	}
	return {
		stop() {
			stopped = true;
			for (const t of timers) clearTimeout(t);
		}
	};
}
