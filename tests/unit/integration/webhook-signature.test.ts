// Webhook signatures and where webhooks may be sent.
import { describe, expect, it } from 'vitest';
import { createHmac } from 'node:crypto';
import { signWebhook, verifyWebhook, SIGNATURE_HEADER, TIMESTAMP_HEADER } from '../../../src/lib/server/integration/webhook-signature';
import { addressRefusal, urlRefusal } from '../../../src/lib/server/integration/outbound';

const headers = (h: Record<string, string>) => new Headers(h);

describe('webhook signatures', () => {
	const secret = 'whsec_test-secret';
	const body = '{"id":"e1","type":"revision.approved","data":{}}';

	it('is HMAC-SHA256 over "timestamp.body", hex, with a v1= prefix', () => {
		// Check value computed independently with Node's crypto (the same as `openssl dgst -sha256 -hmac`).
		const expected = createHmac('sha256', secret).update(`1767225600.${body}`).digest('hex');
		expect(signWebhook(secret, 1767225600, body)).toBe(`v1=${expected}`);
	});

	it('verifies a fresh delivery and refuses a changed body, another secret or an old timestamp', () => {
		const now = 1767225600_000;
		const ts = 1767225600;
		const h = headers({ [TIMESTAMP_HEADER]: String(ts), [SIGNATURE_HEADER]: signWebhook(secret, ts, body) });
		expect(verifyWebhook(secret, h, body, { now })).toEqual({ ok: true });
		expect(verifyWebhook(secret, h, body.replace('e1', 'e2'), { now }).ok).toBe(false);
		expect(verifyWebhook('whsec_other', h, body, { now }).ok).toBe(false);
		expect(verifyWebhook(secret, h, body, { now: now + 301_000 })).toEqual({ ok: false, reason: 'timestamp too old or in the future' });
		expect(verifyWebhook(secret, headers({ [SIGNATURE_HEADER]: 'v1=00' }), body, { now }).ok).toBe(false);
	});
});

describe('where webhooks may be sent', () => {
	it('refuses link-local, unspecified and multicast addresses whatever the setting', () => {
		for (const a of ['169.254.169.254', '0.0.0.0', '224.0.0.1', 'fe80::1', '::', '::ffff:169.254.169.254']) {
			expect(addressRefusal(a, 'private'), a).not.toBeNull();
		}
	});

	it('allows loopback only with loopback or private, private networks only with private', () => {
		expect(addressRefusal('127.0.0.1', 'none')).toMatch(/loopback/);
		expect(addressRefusal('::1', 'none')).toMatch(/loopback/);
		expect(addressRefusal('127.0.0.1', 'loopback')).toBeNull();
		expect(addressRefusal('10.1.2.3', 'loopback')).toMatch(/private/);
		expect(addressRefusal('192.168.1.20', 'none')).toMatch(/private/);
		expect(addressRefusal('::ffff:10.0.0.1', 'loopback')).toMatch(/private/);
		expect(addressRefusal('fd00::5', 'loopback')).toMatch(/private/);
		expect(addressRefusal('10.1.2.3', 'private')).toBeNull();
		expect(addressRefusal('8.8.8.8', 'none')).toBeNull();
	});

	it('checks the URL: http or https only, no credentials, addresses by policy', async () => {
		expect(await urlRefusal('ftp://127.0.0.1/x', 'loopback')).toMatch(/http/);
		expect(await urlRefusal('file:///etc/passwd', 'private')).toMatch(/http/);
		expect(await urlRefusal('http://user:pw@127.0.0.1/x', 'loopback')).toMatch(/password/);
		expect(await urlRefusal('http://127.0.0.1:9/x', 'none')).toMatch(/loopback/);
		expect(await urlRefusal('http://[::1]:9/x', 'loopback')).toBeNull();
		expect(await urlRefusal('http://localhost:9/x', 'none')).toMatch(/loopback/);
		expect(await urlRefusal('not a url', 'private')).toBe('Not a URL.');
	});
});
