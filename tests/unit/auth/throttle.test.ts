import { describe, expect, it } from 'vitest';
import { delayAfter } from '../../../src/lib/server/auth/throttle';
import { addressKey, isLoopback } from '../../../src/lib/server/auth/client-address';

describe('delayAfter (sign-in slowdown)', () => {
	it('is free up to the allowance, then doubles up to the maximum', () => {
		const d = Array.from({ length: 16 }, (_, i) => delayAfter(i + 1, 5, 900));
		expect(d).toEqual([0, 0, 0, 0, 0, 1, 2, 4, 8, 16, 32, 64, 128, 256, 512, 900]);
		expect(delayAfter(10_000, 5, 900)).toBe(900);
	});
});

describe('addressKey', () => {
	it('keeps IPv4 and unwraps IPv4-mapped IPv6', () => {
		expect(addressKey('203.0.113.5')).toBe('203.0.113.5');
		expect(addressKey('::ffff:203.0.113.5')).toBe('203.0.113.5');
	});
	it('counts IPv6 by its /64, however it is written', () => {
		const k = addressKey('2001:db8:1:2:aaaa:bbbb:cccc:dddd');
		expect(k).toBe('2001:db8:1:2::/64');
		expect(addressKey('2001:0db8:0001:0002::1')).toBe(k);
		expect(addressKey('[2001:db8:1:2::ffff]')).toBe(k);
		expect(addressKey('2001:db8:1:3::1')).not.toBe(k);
		expect(addressKey('::1')).toBe('0:0:0:0::/64');
	});
	it('gives one key for anything that is not an address', () => {
		expect(addressKey('')).toBe('unknown');
		expect(addressKey('evil, 1.2.3.4')).toBe('unknown');
	});
});

describe('isLoopback', () => {
	it('knows this machine from others', () => {
		for (const a of ['127.0.0.1', '127.1.2.3', '::1', '::ffff:127.0.0.1', '[::1]']) expect(isLoopback(a)).toBe(true);
		for (const a of ['10.0.0.1', '192.168.1.10', '::2', '', 'localhost.evil.example', '128.0.0.1']) expect(isLoopback(a)).toBe(false);
	});
});
