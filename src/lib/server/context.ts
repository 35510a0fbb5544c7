// Process-wide services for the SvelteKit side, created once from the environment.
import { env } from '$env/dynamic/private';
import { APP_POOL_NAME, createDb, type DbHandle } from './db';
import { createAuth, type Auth } from './auth/lucia';
import { createMailer, type Mailer } from './mail/mailer';
import { createThrottle, DEFAULT_THROTTLE, type Throttle } from './auth/throttle';
import { parsePolicy, type PrivatePolicy } from './integration/outbound';
import type { QueueSettings } from './queue/boss';

export interface AppConfig {
	origin: string;
	/** The database; the live board opens its own small pools on it (realtime.ts). */
	databaseUrl: string;
	/** Where the local test mail server keeps every message (development only). */
	mailCaptureDir: string | null;
	/** DEV_MAIL_VIEWER=1: /dev/mail shows every captured message, reset links included. */
	devMailViewer: boolean;
	dataDir: string;
	/** Which private addresses webhooks may be sent to (WEBHOOK_ALLOW_PRIVATE). */
	webhookPolicy: PrivatePolicy;
	queue: QueueSettings;
}

interface Context {
	handle: DbHandle;
	auth: Auth;
	mailer: Mailer;
	config: AppConfig;
	throttle: Throttle;
}

let ctx: Context | null = null;

/**
 * A setting from the environment. SvelteKit fills `env` when the server initialises; in `npm run
 * dev` the live board (server/dev-plugin.ts) may ask before the first request, so the process
 * environment answers then (in production both are the same).
 */
function setting(name: string): string | undefined {
	return env[name] ?? process.env[name];
}

function intEnv(name: string, fallback: number): number {
	const v = Number(setting(name));
	return Number.isFinite(v) && v > 0 ? v : fallback;
}

/** A count that may be 0 (e.g. no retries). */
function countEnv(name: string, fallback: number): number {
	const raw = setting(name);
	const v = Number(raw);
	return raw !== undefined && raw !== '' && Number.isInteger(v) && v >= 0 ? v : fallback;
}

export function context(): Context {
	if (ctx) return ctx;
	const url = setting('DATABASE_URL');
	if (!url) throw new Error('DATABASE_URL is not set (npm start sets it; see .env.example)');
	const origin = setting('ORIGIN') ?? 'http://127.0.0.1:3000';
	const handle = createDb(url, intEnv('DATABASE_POOL_SIZE', 10), 'app pool', APP_POOL_NAME);
	const d = DEFAULT_THROTTLE;
	ctx = {
		handle,
		auth: createAuth(handle.pool, { secure: origin.startsWith('https:') }),
		mailer: createMailer({
			db: handle.db,
			smtpUrl: setting('SMTP_URL') || undefined,
			from: setting('MAIL_FROM') || 'Spotface <no-reply@spotface.local>'
		}),
		config: {
			origin,
			databaseUrl: url,
			mailCaptureDir: setting('MAIL_CAPTURE_DIR') || null,
			devMailViewer: setting('DEV_MAIL_VIEWER') === '1',
			dataDir: setting('DATA_DIR') || '.data',
			webhookPolicy: parsePolicy(setting('WEBHOOK_ALLOW_PRIVATE')),
			queue: {
				pollSeconds: Math.max(0.5, Number(setting('QUEUE_POLL_SECONDS')) || 2),
				mail: { retryLimit: countEnv('MAIL_RETRY_LIMIT', 4), retryDelay: intEnv('MAIL_RETRY_DELAY_SEC', 60) },
				webhook: { retryLimit: countEnv('WEBHOOK_RETRY_LIMIT', 8), retryDelay: intEnv('WEBHOOK_RETRY_DELAY_SEC', 30) }
			}
		},
		throttle: createThrottle(handle.pool, {
			signInFreePerAccountAddress: intEnv('RATE_LIMIT_SIGNIN_FREE_PER_ACCOUNT_ADDRESS', d.signInFreePerAccountAddress),
			signInFreePerAddress: intEnv('RATE_LIMIT_SIGNIN_FREE_PER_ADDRESS', d.signInFreePerAddress),
			signInMaxDelaySec: intEnv('RATE_LIMIT_SIGNIN_MAX_DELAY_SEC', d.signInMaxDelaySec),
			signInForgetSec: intEnv('RATE_LIMIT_SIGNIN_FORGET_SEC', d.signInForgetSec),
			windowSec: intEnv('RATE_LIMIT_WINDOW_SEC', d.windowSec),
			resetPerAccount: intEnv('RATE_LIMIT_RESET_PER_ACCOUNT', d.resetPerAccount),
			resetPerAddress: intEnv('RATE_LIMIT_RESET_PER_ADDRESS', d.resetPerAddress),
			signUpPerAccount: intEnv('RATE_LIMIT_SIGNUP_PER_ACCOUNT', d.signUpPerAccount),
			signUpPerAddress: intEnv('RATE_LIMIT_SIGNUP_PER_ADDRESS', d.signUpPerAddress),
			invitePerOrganisation: intEnv('RATE_LIMIT_INVITE_PER_ORGANISATION', d.invitePerOrganisation)
		})
	};
	return ctx;
}

export const db = () => context().handle.db;
