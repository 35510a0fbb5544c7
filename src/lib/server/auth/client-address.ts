// The address a request came from, as a key for throttling.
import { isIPv4, isIPv6 } from 'node:net';

/**
 * adapter-node's getClientAddress() is the socket's peer unless ADDRESS_HEADER is set (behind a
 * proxy: ADDRESS_HEADER=x-forwarded-for and XFF_DEPTH). One IPv6 host usually holds a whole /64,
 * so IPv6 addresses count by their /64; IPv4-mapped IPv6 counts as the IPv4 address.
 */
export function addressKey(raw: string): string {
	let a = raw.trim();
	if (a.startsWith('[') && a.endsWith(']')) a = a.slice(1, -1);
	a = a.replace(/%.*$/, ''); // zone id
	const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(a);
	if (mapped) a = mapped[1];
	if (isIPv4(a)) return a;
	if (isIPv6(a)) return `${expandIPv6(a).slice(0, 4).join(':')}::/64`;
	return 'unknown';
}

function expandIPv6(a: string): string[] {
	let s = a.toLowerCase();
	// A trailing dotted IPv4 part becomes two groups.
	const v4 = /(\d+\.\d+\.\d+\.\d+)$/.exec(s);
	if (v4) {
		const p = v4[1].split('.').map(Number);
		s = s.slice(0, -v4[1].length) + `${((p[0] << 8) | p[1]).toString(16)}:${((p[2] << 8) | p[3]).toString(16)}`;
	}
	const [head, tail] = s.split('::');
	const h = head ? head.split(':') : [];
	const t = tail !== undefined && tail !== '' ? tail.split(':') : [];
	const fill = s.includes('::') ? Array(8 - h.length - t.length).fill('0') : [];
	return [...h, ...fill, ...t].map((g) => g.replace(/^0+(?=.)/, ''));
}

/** The request's client address as a throttling key; 'unknown' when it cannot be determined. */
export function clientAddress(event: { getClientAddress(): string }): string {
	try {
		return addressKey(event.getClientAddress());
	} catch {
		// ADDRESS_HEADER is set but the request lacks it: count such requests together.
		return 'unknown';
	}
}

/** Whether an address (as getClientAddress gives it) is this machine. */
export function isLoopback(raw: string): boolean {
	const a = raw
		.trim()
		.replace(/^\[|\]$/g, '')
		.replace(/%.*$/, '')
		.toLowerCase();
	return /^127\.\d+\.\d+\.\d+$/.test(a) || a === '::1' || /^::ffff:127\.\d+\.\d+\.\d+$/.test(a);
}
