// Columns and keys that point at a shop, a person or a parent row of the same shop.
import { foreignKey, text, uuid, type AnyPgColumn } from 'drizzle-orm/pg-core';
import { users } from './auth';
import { shops } from './shops';

/** The shop that owns the row; the row goes with the shop. */
export function shopRef() {
	return uuid()
		.notNull()
		.references(() => shops.id, { onDelete: 'cascade' });
}

/** The person the row belongs to; the row goes with the person. */
export function userRef() {
	return text()
		.notNull()
		.references(() => users.id, { onDelete: 'cascade' });
}

/** Who did something; null once the person is removed. */
export function byUser() {
	return text().references(() => users.id, { onDelete: 'set null' });
}

/**
 * The composite foreign key (shop_id, <parent>_id) → parent (shop_id, id), so a row cannot point
 * at another shop's parent. The caller adds what a delete or update of the parent does.
 */
export function sameShopKey(
	name: string,
	shopId: AnyPgColumn,
	parentId: AnyPgColumn,
	parent: { shopId: AnyPgColumn; id: AnyPgColumn }
) {
	return foreignKey({ name, columns: [shopId, parentId], foreignColumns: [parent.shopId, parent.id] });
}
