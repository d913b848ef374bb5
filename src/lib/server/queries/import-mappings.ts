// The mapping a person chose for a header row, remembered per shop under the row's signature:
// the mapping step suggests it again (api/v1/imports/headers) and an upload without its own
// mapping uses it (import/run.ts). On the postgres.js client of a scoped transaction.
import type { ScopedSql } from '../db/scope';
import { headerSignature, type Layout } from '../import/header';

/** The mapping remembered for these headers, or null. */
export async function rememberedMapping(t: ScopedSql, shopId: string, headers: string[]): Promise<Record<string, string> | null> {
	const [row] = await t<{ mapping: Record<string, string> }[]>`
		select mapping from import_mappings where shop_id = ${shopId} and signature = ${headerSignature(headers)}`;
	return row?.mapping ?? null;
}

/** Remembers `mapping` for these headers (replacing an earlier one). */
export async function rememberMapping(t: ScopedSql, shopId: string, headers: string[], layout: Layout, mapping: Record<string, string>): Promise<void> {
	await t`
		insert into import_mappings (shop_id, signature, layout, mapping)
		values (${shopId}, ${headerSignature(headers)}, ${layout}, ${JSON.stringify(mapping)}::jsonb)
		on conflict (shop_id, signature) do update set mapping = excluded.mapping, layout = excluded.layout, updated_at = now()`;
}
