// The owner's shop settings page: what the shop is and what its archive leaves out.
import { inShop } from '../db';
import { shopProfile } from '../queries/memberships';
import { ARCHIVE_SKIPPED_TABLES } from './shop-archive';

export async function shopSettingsPage(shopId: string) {
	return {
		shop: await inShop(shopId, (tx) => shopProfile(tx, shopId)),
		skipped: Object.entries(ARCHIVE_SKIPPED_TABLES).map(([table, why]) => ({ table, why }))
	};
}
