import { describe, expect, it } from 'vitest';
import { withoutPersonalLinks } from '../../../src/lib/server/db/mail-outbox';

describe('withoutPersonalLinks (organisation outbox)', () => {
	it('removes invitation, reset and sign-up links and keeps the rest', () => {
		const text =
			'Join us:\n\nhttps://app.spotface.test/invite/abc_DEF-123\n\nor https://app.spotface.test/reset-password/xyz and ' +
			'http://127.0.0.1:3000/sign-up/confirm/q-1. Help: https://app.spotface.test/sign-in';
		const out = withoutPersonalLinks(text);
		expect(out).not.toMatch(/abc_DEF|xyz|q-1/);
		expect(out.match(/\[link for the recipient only\]/g)).toHaveLength(3);
		expect(out).toContain('Help: https://app.spotface.test/sign-in');
	});
});
