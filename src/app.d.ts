import type { Viewer } from '$lib/server/auth/lucia';

declare global {
	namespace App {
		interface Locals {
			viewer: Viewer | null;
		}
		interface Error {
			message: string;
		}
	}
}

export {};
