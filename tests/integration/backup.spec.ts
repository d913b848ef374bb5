// npm run backup / npm run restore: the demo shop round-trips through one file into an empty data
// folder (row counts of every table equal); a non-empty data folder is refused and left alone.
import { rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { demoCluster, removeCluster, rowCounts, script, throwawayCluster, type Cluster } from '../helpers/cluster';
import postgres from 'postgres';

let source: Cluster | undefined;
let target: Cluster | undefined;
let file: string | undefined;
afterAll(async () => {
	if (file) rmSync(file, { force: true });
	await removeCluster(source);
	await removeCluster(target);
}, 60_000);

describe('backup and restore', () => {
	it('round-trips the demo shop into an empty data folder and refuses a non-empty one', async () => {
		source = await demoCluster('backup');
		const admin = source.admin();
		const before = await rowCounts(admin);
		await admin.end();
		expect(before['public.shops']).toBe(2);
		expect(before['public.readings']).toBeGreaterThan(0);

		file = join(source.dir, '..', `${source.dir.split('/').pop()}.tar`);
		const backup = await script(['scripts/backup.sh', file], source.env);
		expect(backup.code, backup.stderr).toBe(0);
		expect(statSync(file).mode & 0o777).toBe(0o600);
		await source.pg('stop');

		target = await throwawayCluster('restore');
		const restore = await script(['scripts/restore.sh', file], target.env);
		expect(restore.code, restore.stderr).toBe(0);
		expect((await target.pg('start')).code).toBe(0);
		const restored = target.admin();
		try {
			expect(await rowCounts(restored)).toEqual(before);
			const [row] = await restored`show data_checksums`;
			expect(row.data_checksums).toBe('on');
		} finally {
			await restored.end();
		}
		// The app's role logs in with the saved password.
		const app = postgres(target.appUrl(), { max: 1, onnotice: () => {} });
		try {
			expect((await app`select 1 as one`)[0].one).toBe(1);
		} finally {
			await app.end();
		}

		const again = await script(['scripts/restore.sh', file], target.env);
		expect(again.code).toBe(1);
		expect(again.stderr).toContain('is not empty');
		const still = target.admin();
		try {
			expect(await rowCounts(still)).toEqual(before);
		} finally {
			await still.end();
		}

		const missing = await script(['scripts/restore.sh'], target.env);
		expect(missing.code).toBe(2);
		expect(missing.stderr).toContain('usage: npm run restore FILE');
	}, 180_000);
});
