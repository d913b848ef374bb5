// Item 14 and checksums: scripts/pg.sh with a data folder directly under /tmp leaves /tmp as it
// was (mode 1777, owner root), the cluster runs there, and it was created with data checksums.
import { statSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { removeCluster, throwawayCluster, type Cluster } from '../helpers/cluster';

let cluster: Cluster | undefined;
afterAll(() => removeCluster(cluster), 60_000);

describe('scripts/pg.sh with LAPMARK_DATA_DIR under /tmp', () => {
	it('never changes /tmp, runs the cluster, and turns data checksums on', async () => {
		const before = statSync('/tmp');
		expect(before.mode & 0o7777).toBe(0o1777);
		cluster = await throwawayCluster('pgsh', `/tmp/lapmark-pgsh-${process.pid}-${Date.now()}`);
		const up = await cluster.pg('start', 'lapmark');
		expect(up.code, up.stderr).toBe(0);
		expect((await cluster.pg('status')).stdout).toContain(`running on 127.0.0.1:${cluster.port}`);
		const admin = cluster.admin();
		try {
			const [row] = await admin`show data_checksums`;
			expect(row.data_checksums).toBe('on');
		} finally {
			await admin.end();
		}
		expect((await cluster.pg('stop')).code).toBe(0);
		expect((await cluster.pg('status')).stdout.trim()).toBe('stopped');
		const after = statSync('/tmp');
		expect(after.mode & 0o7777).toBe(0o1777);
		expect(after.uid).toBe(0);
		expect(statSync(cluster.dir).mode & 0o777).toBe(0o755);
	}, 60_000);
});
