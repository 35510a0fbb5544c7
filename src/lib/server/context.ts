// Process-wide services for the SvelteKit side, created once from the environment.
import { env } from '$env/dynamic/private';
import { createDb, type DbHandle } from './db';
import { createAuth, type Auth } from './auth/lucia';
import { createMailer, type Mailer } from './mail/mailer';
import { createLimiter, type Limiter } from './rate-limit';

export interface AppConfig {
	origin: string;
	mailCaptureDir: string | null;
	dataDir: string;
}

interface Context {
	handle: DbHandle;
	auth: Auth;
	mailer: Mailer;
	config: AppConfig;
	limits: {
		signInPerAccount: Limiter;
		signInPerAddress: Limiter;
		resetPerAccount: Limiter;
		resetPerAddress: Limiter;
	};
}

let ctx: Context | null = null;

function intEnv(name: string, fallback: number): number {
	const v = Number(env[name]);
	return Number.isFinite(v) && v > 0 ? v : fallback;
}

export function context(): Context {
	if (ctx) return ctx;
	const url = env.DATABASE_URL;
	if (!url) throw new Error('DATABASE_URL is not set (npm start sets it; see .env.example)');
	const origin = env.ORIGIN ?? 'http://127.0.0.1:3000';
	const handle = createDb(url, intEnv('DATABASE_POOL_SIZE', 10));
	const window = intEnv('RATE_LIMIT_WINDOW_SEC', 900) * 1000;
	ctx = {
		handle,
		auth: createAuth(handle.pool, { secure: origin.startsWith('https:') }),
		mailer: createMailer({ smtpUrl: env.SMTP_URL || undefined, from: env.MAIL_FROM || 'Spotface <no-reply@spotface.local>' }),
		config: {
			origin,
			mailCaptureDir: env.MAIL_CAPTURE_DIR || null,
			dataDir: env.DATA_DIR || '.data'
		},
		limits: {
			signInPerAccount: createLimiter({ limit: intEnv('RATE_LIMIT_SIGNIN_PER_ACCOUNT', 10), windowMs: window }),
			signInPerAddress: createLimiter({ limit: intEnv('RATE_LIMIT_SIGNIN_PER_ADDRESS', 50), windowMs: window }),
			resetPerAccount: createLimiter({ limit: intEnv('RATE_LIMIT_RESET_PER_ACCOUNT', 5), windowMs: window }),
			resetPerAddress: createLimiter({ limit: intEnv('RATE_LIMIT_RESET_PER_ADDRESS', 20), windowMs: window })
		}
	};
	return ctx;
}

export const db = () => context().handle.db;
