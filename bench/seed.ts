// The benches' data: the demo generator scaled to `target` readings and seeded through seedDemo
// (COPY into staging, one INSERT … SELECT per shop: the triggers run).
import type postgres from 'postgres';
import { generateDemo } from '../src/lib/server/demo/generate';
import { seedDemo } from '../src/lib/server/demo/seed';

/** `shops`: 1 puts every reading in the first demo shop (brackenford); 2 splits them as the demo does. */
export async function seedScaled(sql: postgres.Sql, target: number, endDate: string, log: (m: string) => void, shops = 2) {
	// Readings per original job, from a small run of the same generator; then scale to the target.
	const probe = generateDemo({ endDate, shops, headsTotal: 400 });
	let headsTotal = Math.ceil(target / (probe.counts.readings / 400));
	let data = generateDemo({ endDate, shops, headsTotal });
	while (data.counts.readings < target) {
		headsTotal += Math.ceil((target - data.counts.readings) / (probe.counts.readings / 400)) + 1;
		data = generateDemo({ endDate, shops, headsTotal });
	}
	let readingsInsertMs = 0;
	const seedStart = performance.now();
	const seeded = await seedDemo(sql, {
		endDate,
		headsTotal,
		data,
		analyze: true,
		log: (m) => {
			const hit = /^\s+readings: \d+ rows \(copy \d+ ms, insert (\d+) ms\)/.exec(m);
			if (hit) readingsInsertMs += Number(hit[1]);
		}
	});
	const seedMs = performance.now() - seedStart;
	log(`seeded ${seeded.counts.readings} readings on ${seeded.counts.heads} heads in ${(seedMs / 1000).toFixed(1)} s (INSERT … SELECT into readings, triggers included: ${(readingsInsertMs / 1000).toFixed(1)} s)`);
	return { seeded, seedMs, readingsInsertMs };
}
