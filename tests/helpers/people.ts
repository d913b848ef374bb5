// People for tests: a shop with one user per role, made directly in the test database.
import { randomUUID } from 'node:crypto';
import { hashPassword } from '../../src/lib/server/auth/passwords';
import { withSystem } from '../../src/lib/server/db/scope';
import { memberships, users } from '../../src/lib/server/db/schema';
import { ROLES, type Role } from '../../src/lib/measurements';
import { makeShop, type testDb } from './db';

export interface TestPerson {
	email: string;
	password: string;
	role: Role;
	userId: string;
}

export async function shopWithPeople(db: ReturnType<typeof testDb>['db'], label: string) {
	const { shop, family } = await makeShop(db, label);
	const password = 'correct horse battery';
	const hash = await hashPassword(password);
	const people = {} as Record<Role, TestPerson>;
	await withSystem(db, async (tx) => {
		for (const role of ROLES) {
			const email = `${role}.${shop.slug}@test.example`;
			const [u] = await tx.insert(users).values({ email, name: `${role} of ${shop.slug}`, passwordHash: hash }).returning();
			await tx.insert(memberships).values({ shopId: shop.id, userId: u.id, role });
			people[role] = { email, password, role, userId: u.id };
		}
	});
	return { shop, family, people };
}

export function uniqueEmail(label = 'person') {
	return `${label}-${randomUUID().slice(0, 8)}@test.example`;
}
