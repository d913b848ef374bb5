// The access policy, as data: for every route, each method or form action and the least role
// that may use it. Pure, so a test can walk src/routes and fail on any route missing here.
import type { Role } from '$lib/measurements';

/** `public`: anyone; `user`: any signed-in user, shop or not; a role: that role or higher. */
export type Access = 'public' | 'user' | Role;
export type Operation = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE' | `action:${string}`;
export type RoutePolicy = Partial<Record<Operation, Access>>;

import { ROLE_RANK, roleAtLeast } from '$lib/roles';
export { ROLE_RANK, roleAtLeast };

/** Lower of two roles: a token never carries more than its creator holds today. */
export function lowerRole(a: Role, b: Role): Role {
	return ROLE_RANK[a] <= ROLE_RANK[b] ? a : b;
}

export const POLICY: Record<string, RoutePolicy> = {
	'/(app)': { GET: 'viewer' },
	'/(app)/switch-shop': { GET: 'user', 'action:default': 'user' },
	'/(auth)/signin': { GET: 'public', 'action:password': 'public', 'action:link': 'public' },
	'/(auth)/signin/check-email': { GET: 'public' },
	'/(auth)/signin/forgot': { GET: 'public', 'action:default': 'public' },
	'/(auth)/signin/reset/[token]': { GET: 'public', 'action:default': 'public' },
	'/(auth)/invite/[token]': { GET: 'public', 'action:accept': 'public' },
	'/(app)/settings/members': {
		GET: 'owner',
		'action:invite': 'owner',
		'action:role': 'owner',
		'action:remove': 'owner',
		'action:revokeInvite': 'owner'
	},
	'/(app)/settings/password': { GET: 'user', 'action:default': 'user' },
	'/(app)/settings/tokens': { GET: 'engineer', 'action:create': 'engineer', 'action:revoke': 'engineer' },
	'/(app)/audit': { GET: 'engineer' },
	'/(app)/dev/mail': { GET: 'owner' },
	'/(app)/dev/mail/[id]': { GET: 'owner' },
	'/(app)/heads': { GET: 'viewer' },
	'/(app)/heads/new': { GET: 'machinist', 'action:default': 'machinist' },
	// Release is a machinist's job; releasing over a failing check is the owner's (checked in the action).
	'/(app)/heads/[id]': { GET: 'viewer', 'action:release': 'machinist', 'action:emailReport': 'machinist', 'action:comeback': 'machinist' },
	'/(app)/heads/[id]/entry/[stage]': { GET: 'viewer', 'action:save': 'machinist' },
	'/(app)/heads/[id]/decisions': { GET: 'viewer', 'action:decide': 'machinist', 'action:acceptAll': 'machinist' },
	'/(app)/heads/[id]/report': { GET: 'viewer' },
	'/(app)/families': { GET: 'machinist', 'action:create': 'engineer', 'action:sealPass': 'engineer' },
	'/(app)/families/[id]': { GET: 'machinist', 'action:update': 'engineer', 'action:limit': 'engineer' },
	'/(app)/instruments': { GET: 'machinist', 'action:create': 'engineer', 'action:calibrate': 'engineer', 'action:retire': 'engineer' },
	'/(auth)/signout': { GET: 'public', 'action:default': 'user' },
	'/api/health': { GET: 'public' },
	'/api/v1/overview': { GET: 'viewer' },
	'/api/v1/me': { GET: 'viewer' },
	'/api/v1/families': { GET: 'viewer' },
	'/api/v1/imports': { GET: 'machinist', POST: 'machinist' },
	'/api/v1/imports/[id]': { GET: 'machinist', DELETE: 'engineer' },
	'/api/v1/imports/[id]/rejects.csv': { GET: 'machinist' },
	'/api/v1/imports/headers': { POST: 'machinist' },
	'/(app)/imports': { GET: 'machinist', 'action:undo': 'engineer' },
	'/(app)/check': { GET: 'machinist' },
	'/(app)/fleet': { GET: 'machinist' },
	'/(app)/fleet/[code]': { GET: 'machinist' },
	'/(app)/quality': { GET: 'machinist', 'action:baseline': 'engineer' },
	'/api/v1/check': { GET: 'viewer' },
	'/api/v1/stats/capability': { GET: 'viewer' },
	'/api/v1/stats/capability/machinists': { GET: 'viewer' },
	'/api/v1/stats/comebacks': { GET: 'viewer' },
	'/api/v1/stats/first-pass': { GET: 'viewer' },
	'/api/v1/stats/compare': { GET: 'viewer' },
	'/api/v1/stats/control': { GET: 'viewer' },
	'/api/v1/stats/pchart': { GET: 'viewer' },
	'/api/v1/stats/distribution': { GET: 'viewer' },
	'/api/v1/stats/outliers': { GET: 'viewer' },
	'/api/v1/stats/rates': { GET: 'viewer' },
	'/api/v1/stats/wear': { GET: 'viewer' },
	'/api/v1/stats/describe': { POST: 'viewer' },
	'/(app)/outliers': { GET: 'machinist' },
	'/(app)/rates': { GET: 'machinist' },
	'/api/v1/readings': { GET: 'engineer' },
	'/(app)/explore': { GET: 'engineer' },
	'/api/v1/openapi.json': { GET: 'public' },
	'/(app)/api-guide': { GET: 'engineer' },
	'/(auth)/signup': { GET: 'public', 'action:default': 'public' },
	'/(auth)/signup/confirm/[token]': { GET: 'public', 'action:confirm': 'public' },
	'/(app)/settings/shop': { GET: 'owner' },
	'/(app)/settings/shop/archive.zip': { GET: 'owner' }
};

/** Which operation a request is: its method, or `action:<name>` for a form action POST. */
export function operationOf(method: string, search: string, isPage: boolean): Operation {
	if (isPage && method === 'POST') {
		const q = new URLSearchParams(search);
		for (const key of q.keys()) if (key.startsWith('/')) return `action:${key.slice(1)}`;
		return 'action:default';
	}
	return (method === 'HEAD' ? 'GET' : method) as Operation;
}
