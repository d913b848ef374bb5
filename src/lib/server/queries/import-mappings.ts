import { and, eq } from 'drizzle-orm';
import type { Conn } from '../db/scope';
import { importMappings } from '../db/schema';
import { headerSignature } from '../import/header';

export async function rememberedMappingFor(conn: Conn, shopId: string, headers: string[]) {
	const [row] = await conn
		.select({ mapping: importMappings.mapping })
		.from(importMappings)
		.where(and(eq(importMappings.shopId, shopId), eq(importMappings.signature, headerSignature(headers))))
		.limit(1);
	return row?.mapping ?? null;
}
