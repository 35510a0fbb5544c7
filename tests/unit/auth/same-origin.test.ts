import { describe, expect, it } from 'vitest';
import { sameOriginPath } from '../../../src/lib/server/http/same-origin';
import { BYPASSES } from '../../helpers/redirects';

const ORIGIN = 'https://app.spotface.test';

describe('sameOriginPath', () => {
	it.each(BYPASSES.map((b) => [JSON.stringify(b), b]))('refuses %s', (_, next) => {
		expect(sameOriginPath(next, ORIGIN)).toBe('/');
	});

	it('refuses null, undefined and very long values', () => {
		expect(sameOriginPath(null, ORIGIN)).toBe('/');
		expect(sameOriginPath(undefined, ORIGIN)).toBe('/');
		expect(sameOriginPath('/' + 'a'.repeat(3000), ORIGIN)).toBe('/');
	});

	it('keeps same-origin paths with query and fragment', () => {
		expect(sameOriginPath('/surveys', ORIGIN)).toBe('/surveys');
		expect(sameOriginPath('/register/machines?q=pump&page=2', ORIGIN)).toBe('/register/machines?q=pump&page=2');
		expect(sameOriginPath('/surveys/1#board', ORIGIN)).toBe('/surveys/1#board');
		expect(sameOriginPath('/a/../settings', ORIGIN)).toBe('/settings');
		expect(sameOriginPath('/search?next=//evil.example', ORIGIN)).toBe('/search?next=//evil.example');
	});

	it('uses the given fallback', () => {
		expect(sameOriginPath('//evil.example', ORIGIN, '/home')).toBe('/home');
	});

	it('every result resolves to the origin itself', () => {
		for (const next of [...BYPASSES, '/surveys', '/x?y=1']) {
			expect(new URL(sameOriginPath(next, ORIGIN), ORIGIN).origin).toBe(ORIGIN);
		}
	});
});
