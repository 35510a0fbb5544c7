// Throttling of sign-in and of requests that send mail, with counters in PostgreSQL (the
// `rate_limit` table, through rate-limiter-flexible's RateLimiterPostgres), so a restart or a
// second process shares them.
//
// Sign-in is never locked for everyone: failures count per account-and-address and per address.
// Past a number of free failures, each further attempt from that address waits a delay that
// doubles with every failure (1 s, 2 s, 4 s … up to a maximum). The owner signing in from
// another address is not slowed by a stranger's guesses.
import { createHash } from 'node:crypto';
import type pg from 'pg';
import { RateLimiterPostgres, RateLimiterRes } from 'rate-limiter-flexible';

export interface ThrottleSettings {
	/** Failed sign-ins for one account from one address before delays start. */
	signInFreePerAccountAddress: number;
	/** Failed sign-ins from one address, any account, before delays start. */
	signInFreePerAddress: number;
	/** The longest delay between attempts, seconds. */
	signInMaxDelaySec: number;
	/** Failure counts are forgotten this long after the first failure, seconds. */
	signInForgetSec: number;
	/** Window of the request limits below, seconds. */
	windowSec: number;
	resetPerAccount: number;
	resetPerAddress: number;
	signUpPerAccount: number;
	signUpPerAddress: number;
	invitePerOrganisation: number;
}

export const DEFAULT_THROTTLE: ThrottleSettings = {
	signInFreePerAccountAddress: 5,
	signInFreePerAddress: 20,
	signInMaxDelaySec: 900,
	signInForgetSec: 86_400,
	windowSec: 3600,
	resetPerAccount: 5,
	resetPerAddress: 20,
	signUpPerAccount: 5,
	signUpPerAddress: 10,
	invitePerOrganisation: 100
};

export type Verdict = { ok: true } | { ok: false; retryAfterSec: number };

/** Seconds to wait after the `failures`-th failure, given `free` failures without delay. */
export function delayAfter(failures: number, free: number, maxSec: number): number {
	if (failures <= free) return 0;
	return Math.min(2 ** Math.min(failures - free - 1, 30), maxSec);
}

// Keys hold no e-mail address in clear and stay within the table's 255 characters.
const h = (s: string) => createHash('sha256').update(s.trim().toLowerCase()).digest('hex').slice(0, 32);

// How long one attempt may hold the right to be checked once a delay applies (a crashed request
// frees it after this).
const HOLD_SEC = 30;

export type RequestKind = 'reset' | 'signUp' | 'invite';

export interface Throttle {
	/** Before checking a password: may this attempt go ahead? */
	beginSignIn(email: string, address: string): Promise<Verdict>;
	signInFailed(email: string, address: string): Promise<void>;
	signInSucceeded(email: string, address: string): Promise<void>;
	/** Counts a request that sends mail; refuses it over the limit of any of its keys. */
	request(kind: RequestKind, keys: { address?: string; account?: string; organisation?: string }): Promise<Verdict>;
}

export function createThrottle(pool: pg.Pool, s: ThrottleSettings = DEFAULT_THROTTLE): Throttle {
	let sweeper = true;
	const make = (keyPrefix: string, points: number, duration: number) => {
		const limiter = new RateLimiterPostgres({
			storeClient: pool,
			storeType: 'pool',
			tableName: 'rate_limit',
			tableCreated: true, // created by a migration
			// All limiters share the table: one of them deletes expired rows (every 5 minutes).
			clearExpiredByTimeout: sweeper,
			keyPrefix,
			points,
			duration
		});
		sweeper = false;
		return limiter;
	};
	const scope = (name: string, free: number) => ({
		free,
		failures: make(`signin_fail_${name}`, 1_000_000, s.signInForgetSec),
		gate: make(`signin_wait_${name}`, 1, HOLD_SEC)
	});
	const accountAddress = scope('aa', s.signInFreePerAccountAddress);
	const address = scope('a', s.signInFreePerAddress);
	const scopesFor = (email: string, addr: string) => [
		{ ...accountAddress, key: `${h(email)}:${addr}` },
		{ ...address, key: addr }
	];

	const limits = {
		reset: {
			account: make('reset_account', s.resetPerAccount, s.windowSec),
			address: make('reset_address', s.resetPerAddress, s.windowSec)
		},
		signUp: {
			account: make('signup_account', s.signUpPerAccount, s.windowSec),
			address: make('signup_address', s.signUpPerAddress, s.windowSec)
		},
		invite: { organisation: make('invite_org', s.invitePerOrganisation, s.windowSec) }
	} satisfies Record<RequestKind, Record<string, RateLimiterPostgres>>;

	const wait = (r: RateLimiterRes): Verdict => ({ ok: false, retryAfterSec: Math.max(1, Math.ceil(r.msBeforeNext / 1000)) });

	return {
		async beginSignIn(email, addr) {
			const held: { gate: RateLimiterPostgres; key: string }[] = [];
			for (const sc of scopesFor(email, addr)) {
				const n = (await sc.failures.get(sc.key))?.consumedPoints ?? 0;
				if (n < sc.free) continue;
				// Past the free failures, one attempt at a time, and none until the delay has passed:
				// the gate holds one point; a delay blocks it; the first attempt after takes it.
				try {
					await sc.gate.consume(sc.key);
					held.push(sc);
				} catch (e) {
					if (!(e instanceof RateLimiterRes)) throw e;
					for (const g of held) await g.gate.delete(g.key);
					return wait(e);
				}
			}
			return { ok: true };
		},
		async signInFailed(email, addr) {
			for (const sc of scopesFor(email, addr)) {
				const n = (await sc.failures.penalty(sc.key, 1)).consumedPoints;
				const delay = delayAfter(n, sc.free, s.signInMaxDelaySec);
				if (delay > 0) await sc.gate.block(sc.key, delay);
				else await sc.gate.delete(sc.key);
			}
		},
		async signInSucceeded(email, addr) {
			const [aa, a] = scopesFor(email, addr);
			await Promise.all([aa.failures.delete(aa.key), aa.gate.delete(aa.key)]);
			// The address's own count stays: signing in to one account must not reset the guessing
			// budget of an address. Only its gate, if this attempt held it, is released.
			const n = (await a.failures.get(a.key))?.consumedPoints ?? 0;
			if (n >= a.free) {
				const g = await a.gate.get(a.key);
				if (g && g.consumedPoints <= 1) await a.gate.delete(a.key);
			}
		},
		async request(kind, keys) {
			const set = limits[kind] as Record<string, RateLimiterPostgres>;
			const tried = await Promise.allSettled(
				Object.entries(keys)
					.filter(([name, value]) => value && set[name])
					.map(([name, value]) => set[name].consume(name === 'address' ? value! : h(value!)))
			);
			let worst: RateLimiterRes | null = null;
			for (const t of tried) {
				if (t.status === 'fulfilled') continue;
				if (!(t.reason instanceof RateLimiterRes)) throw t.reason;
				if (!worst || t.reason.msBeforeNext > worst.msBeforeNext) worst = t.reason;
			}
			return worst ? wait(worst) : { ok: true };
		}
	};
}
