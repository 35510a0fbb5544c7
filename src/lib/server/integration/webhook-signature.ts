// Signing and verifying webhook deliveries. The receiver recomputes
// HMAC-SHA256(secret, `${timestamp}.${body}`) over the raw body and compares it with the
// signature header in constant time, and refuses timestamps far from its clock (replays).
import { createHmac, timingSafeEqual } from 'node:crypto';

export const SIGNATURE_HEADER = 'spotface-signature';
export const TIMESTAMP_HEADER = 'spotface-timestamp';
export const EVENT_HEADER = 'spotface-event';
export const DELIVERY_HEADER = 'spotface-delivery';
/** How far a delivery's timestamp may be from the receiver's clock, in seconds. */
export const DEFAULT_TOLERANCE_SEC = 300;

export function signWebhook(secret: string, timestamp: number, body: string): string {
	return 'v1=' + createHmac('sha256', secret).update(`${timestamp}.${body}`).digest('hex');
}

export type VerifyResult = { ok: true } | { ok: false; reason: string };

/** What a receiver does with a delivery: `headers` as received, `body` the raw text. */
export function verifyWebhook(
	secret: string,
	headers: { get(name: string): string | null },
	body: string,
	opts: { toleranceSec?: number; now?: number } = {}
): VerifyResult {
	const ts = Number(headers.get(TIMESTAMP_HEADER));
	const sig = headers.get(SIGNATURE_HEADER) ?? '';
	if (!Number.isInteger(ts)) return { ok: false, reason: 'no timestamp' };
	const now = Math.floor((opts.now ?? Date.now()) / 1000);
	if (Math.abs(now - ts) > (opts.toleranceSec ?? DEFAULT_TOLERANCE_SEC)) return { ok: false, reason: 'timestamp too old or in the future' };
	const expected = Buffer.from(signWebhook(secret, ts, body));
	// Several signatures may be sent while a secret is being replaced: any one matching will do.
	const ok = sig
		.split(/[ ,]+/)
		.filter(Boolean)
		.some((s) => {
			const given = Buffer.from(s);
			return given.length === expected.length && timingSafeEqual(given, expected);
		});
	return ok ? { ok: true } : { ok: false, reason: 'signature does not match' };
}
