// Where webhooks may be sent (server-side request forgery). Only http and https, no user or
// password in the URL, no redirects followed, and every address the host name resolves to is
// checked at connect time (so a name that resolves elsewhere later is checked again):
// - always refused: unspecified, link-local (cloud metadata at 169.254.169.254), multicast,
//   broadcast and reserved addresses;
// - loopback and private networks (RFC 1918, 100.64/10, fc00::/7) only when
//   WEBHOOK_ALLOW_PRIVATE says so: `loopback` (what npm start and npm test set) or `private`
//   (loopback and private networks: a maintenance system on the plant's own network);
// - public addresses always.
import { BlockList, isIP } from 'node:net';
import { lookup as dnsLookup } from 'node:dns';
import http from 'node:http';
import https from 'node:https';

export type PrivatePolicy = 'none' | 'loopback' | 'private';

function list(v4: string[], v6: string[]): BlockList {
	const b = new BlockList();
	for (const c of v4) {
		const [a, n] = c.split('/');
		b.addSubnet(a, Number(n), 'ipv4');
	}
	for (const c of v6) {
		const [a, n] = c.split('/');
		b.addSubnet(a, Number(n), 'ipv6');
	}
	return b;
}

const NEVER = list(
	['0.0.0.0/8', '169.254.0.0/16', '224.0.0.0/4', '240.0.0.0/4', '192.0.0.0/24', '192.0.2.0/24', '198.51.100.0/24', '203.0.113.0/24'],
	['::/128', 'fe80::/10', 'ff00::/8', '2001:db8::/32', '64:ff9b::/96']
);
const LOOPBACK = list(['127.0.0.0/8'], ['::1/128']);
const PRIVATE = list(['10.0.0.0/8', '172.16.0.0/12', '192.168.0.0/16', '100.64.0.0/10', '198.18.0.0/15'], ['fc00::/7']);

export function parsePolicy(v: string | undefined): PrivatePolicy {
	return v === 'loopback' || v === 'private' ? v : 'none';
}

/** Why an address may not be called, or null when it may. */
export function addressRefusal(address: string, policy: PrivatePolicy): string | null {
	let a = address;
	const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(a);
	if (mapped) a = mapped[1];
	const family = isIP(a) === 6 ? 'ipv6' : isIP(a) === 4 ? 'ipv4' : null;
	if (!family) return `${address} is not an IP address`;
	if (NEVER.check(a, family)) return `${address} is a reserved, link-local or multicast address`;
	if (LOOPBACK.check(a, family))
		return policy === 'none' ? `${address} is this machine (loopback); set WEBHOOK_ALLOW_PRIVATE=loopback to allow it` : null;
	if (PRIVATE.check(a, family))
		return policy === 'private' ? null : `${address} is on a private network; set WEBHOOK_ALLOW_PRIVATE=private to allow it`;
	return null;
}

/** Checks a URL before it is stored: scheme, credentials and (when the name resolves now) the addresses. */
export async function urlRefusal(raw: string, policy: PrivatePolicy): Promise<string | null> {
	let u: URL;
	try {
		u = new URL(raw);
	} catch {
		return 'Not a URL.';
	}
	if (u.protocol !== 'http:' && u.protocol !== 'https:') return 'Only http:// and https:// URLs.';
	if (u.username || u.password) return 'No user name or password in the URL; the signature proves the sender.';
	const host = u.hostname.replace(/^\[|\]$/g, '');
	const addresses = isIP(host)
		? [host]
		: await new Promise<string[]>((resolve) =>
				dnsLookup(host, { all: true }, (err, found) => resolve(err ? [] : found.map((f) => f.address)))
			);
	if (addresses.length === 0) return `The host ${host} cannot be found.`;
	for (const a of addresses) {
		const why = addressRefusal(a, policy);
		if (why) return `Not allowed: ${why}.`;
	}
	return null;
}

type LookupCallback = (err: NodeJS.ErrnoException | null, address: string | { address: string; family: number }[], family?: number) => void;

/** A dns lookup that refuses addresses the policy does not allow (checked on every connection). */
function guardedLookup(policy: PrivatePolicy) {
	return (hostname: string, options: { all?: boolean } | number, callback: LookupCallback) => {
		const all = typeof options === 'object' && options.all === true;
		dnsLookup(hostname, { all: true }, (err, found) => {
			if (err) return callback(err, all ? [] : '', 4);
			const bad = found.map((f) => addressRefusal(f.address, policy)).find((r) => r !== null);
			if (bad) {
				const e = new Error(`Not allowed: ${bad}`) as NodeJS.ErrnoException;
				e.code = 'EADDRNOTALLOWED';
				return callback(e, all ? [] : '', 4);
			}
			if (all) callback(null, found);
			else callback(null, found[0].address, found[0].family);
		});
	};
}

export interface PostResult {
	status: number;
	/** The start of the answer's body, for the delivery record. */
	body: string;
}

/** POSTs a body to a URL under the policy; no redirects; `timeoutMs` for the whole exchange. */
export function postGuarded(
	raw: string,
	body: string,
	headers: Record<string, string>,
	policy: PrivatePolicy,
	timeoutMs = 10_000
): Promise<PostResult> {
	return new Promise((resolve, reject) => {
		const u = new URL(raw);
		if (u.protocol !== 'http:' && u.protocol !== 'https:') return reject(new Error('Only http:// and https:// URLs.'));
		const host = u.hostname.replace(/^\[|\]$/g, '');
		if (isIP(host)) {
			const why = addressRefusal(host, policy);
			if (why) return reject(new Error(`Not allowed: ${why}`));
		}
		const mod = u.protocol === 'https:' ? https : http;
		const req = mod.request(
			u,
			{
				method: 'POST',
				headers: { 'content-type': 'application/json', 'content-length': String(Buffer.byteLength(body)), ...headers },
				lookup: guardedLookup(policy) as never,
				agent: false,
				timeout: timeoutMs
			},
			(res) => {
				let text = '';
				res.setEncoding('utf8');
				res.on('data', (d: string) => {
					if (text.length < 1000) text += d;
				});
				res.on('end', () => resolve({ status: res.statusCode ?? 0, body: text.slice(0, 1000) }));
				res.on('error', reject);
			}
		);
		const timer = setTimeout(() => req.destroy(new Error(`No answer within ${timeoutMs / 1000} s`)), timeoutMs);
		req.on('close', () => clearTimeout(timer));
		req.on('timeout', () => req.destroy(new Error(`No answer within ${timeoutMs / 1000} s`)));
		req.on('error', reject);
		req.end(body);
	});
}
