// Role order, shared by client and server (the server's access policy uses the same ranks).
import type { Role } from './measurements';

export const ROLE_RANK: Record<Role, number> = { viewer: 0, machinist: 1, engineer: 2, owner: 3 };

export function roleAtLeast(role: Role, least: Role): boolean {
	return ROLE_RANK[role] >= ROLE_RANK[least];
}
