// Streams rows out of one shop-scoped transaction into an HTTP response without holding them
// in memory: the database cursor advances only as fast as the client reads.
import type postgres from 'postgres';
import { withShopSql } from './scope';

export function streamFromShop(
	sql: postgres.Sql,
	shopId: string,
	produce: (t: postgres.TransactionSql) => AsyncIterable<string>
): ReadableStream<Uint8Array> {
	const encoder = new TextEncoder();
	let iterator: AsyncIterator<string> | null = null;
	let release: (() => void) | null = null;
	let failed: unknown = null;
	// The transaction stays open while the response is being read; `ready` hands its iterator out.
	let ready!: (it: AsyncIterator<string>) => void;
	const started = new Promise<AsyncIterator<string>>((r) => (ready = r));
	const done = new Promise<void>((r) => (release = r));
	const tx = withShopSql(sql, shopId, async (t) => {
		ready(produce(t)[Symbol.asyncIterator]());
		await done;
	}).catch((e) => {
		failed = e;
		ready({ next: () => Promise.reject(e) });
	});
	return new ReadableStream<Uint8Array>({
		async pull(controller) {
			iterator ??= await started;
			try {
				const next = await iterator.next();
				if (next.done) {
					release?.();
					await tx;
					if (failed) controller.error(failed);
					else controller.close();
				} else {
					controller.enqueue(encoder.encode(next.value));
				}
			} catch (e) {
				release?.();
				controller.error(e);
			}
		},
		async cancel() {
			await iterator?.return?.();
			release?.();
			await tx;
		}
	});
}
