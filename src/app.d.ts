import type { Actor } from '$lib/server/auth/actor';

declare global {
	namespace App {
		interface Error {
			message: string;
			id?: string;
		}
		interface Locals {
			actor: Actor | null;
		}
	}
}

export {};
