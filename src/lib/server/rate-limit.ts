// Fixed-window counters in memory. One process per limiter; behind a load balancer each process
// limits on its own, which still bounds guessing to N × limit.
export interface Limiter {
	hit(key: string): { ok: boolean; retryAfterSec: number };
	reset(key: string): void;
}

export function createLimiter(opts: { limit: number; windowMs: number }): Limiter {
	const hits = new Map<string, { count: number; resetAt: number }>();
	return {
		hit(key) {
			const now = Date.now();
			if (hits.size > 10_000) {
				for (const [k, v] of hits) if (v.resetAt <= now) hits.delete(k);
			}
			let entry = hits.get(key);
			if (!entry || entry.resetAt <= now) {
				entry = { count: 0, resetAt: now + opts.windowMs };
				hits.set(key, entry);
			}
			entry.count++;
			return {
				ok: entry.count <= opts.limit,
				retryAfterSec: Math.max(1, Math.ceil((entry.resetAt - now) / 1000))
			};
		},
		reset(key) {
			hits.delete(key);
		}
	};
}
