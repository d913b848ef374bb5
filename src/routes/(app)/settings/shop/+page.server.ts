import { eq } from 'drizzle-orm';
import { requireRole } from '$lib/server/auth/guards';
import { db } from '$lib/server/db';
import { withShop } from '$lib/server/db/scope';
import { shops } from '$lib/server/db/schema';
import { ARCHIVE_SKIPPED_TABLES } from '$lib/server/services/shop-archive';
import type { PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const actor = requireRole(event, 'owner');
	const [shop] = await withShop(db, actor.shopId, (tx) =>
		tx
			.select({ name: shops.name, slug: shops.slug, lengthUnit: shops.lengthUnit, distanceUnit: shops.distanceUnit, currency: shops.currency, createdAt: shops.createdAt })
			.from(shops)
			.where(eq(shops.id, actor.shopId))
	);
	return { shop, skipped: Object.entries(ARCHIVE_SKIPPED_TABLES).map(([table, why]) => ({ table, why })) };
};
