import { describe, expect, test } from 'vitest';
import {
	countBySeverity,
	RULES,
	RULES_BY_ID,
	SEVERITIES,
	SEVERITY_META,
	sortFindings,
	THRESHOLD_KEYS,
	worstSeverity,
	type Finding
} from '../../../src/lib/trade';

const f = (severity: Finding['severity'], rule = 'seat.flat-diameter'): Finding => ({ rule, severity, message: 'm', reference: 'r' });

describe('worstSeverity', () => {
	test('fail beats warn beats pass; none is pass', () => {
		expect(worstSeverity([])).toBe('pass');
		expect(worstSeverity([f('pass'), f('pass')])).toBe('pass');
		expect(worstSeverity([f('pass'), f('warn')])).toBe('warn');
		expect(worstSeverity([f('warn'), f('fail'), f('pass')])).toBe('fail');
	});
	test('an unknown severity is treated as a fail, never as good', () => {
		expect(worstSeverity([{ severity: 'ok' as never }])).toBe('fail');
	});
	test('sort and count', () => {
		const list = [f('pass', 'b'), f('fail', 'z'), f('warn', 'a'), f('fail', 'c')];
		expect(sortFindings(list).map((x) => x.rule)).toEqual(['c', 'z', 'a', 'b']);
		expect(countBySeverity(list)).toEqual({ pass: 1, warn: 1, fail: 2 });
	});
});

describe('SEVERITY_META', () => {
	test('each severity has its own word, shape and glyph, so colour is never the only cue', () => {
		const metas = SEVERITIES.map((s) => SEVERITY_META[s]);
		for (const key of ['word', 'shape', 'glyph', 'tone', 'rank'] as const) {
			expect(new Set(metas.map((m) => m[key])).size).toBe(3);
		}
		expect(SEVERITY_META.pass.shape).toBe('circle');
		expect(SEVERITY_META.warn.shape).toBe('triangle');
		expect(SEVERITY_META.fail.shape).toBe('square');
	});
});

describe('RULES catalogue', () => {
	test('ids are unique, dotted kebab-case, with title, explanation, reference and firmness', () => {
		const ids = RULES.map((r) => r.id);
		expect(new Set(ids).size).toBe(ids.length);
		for (const r of RULES) {
			expect(r.id).toMatch(/^[a-z]+(-[a-z]+)*\.[a-z]+(-[a-z]+)*$/);
			expect(r.title.length).toBeGreaterThan(0);
			expect(r.explanation.length).toBeGreaterThan(20);
			expect(r.reference.length).toBeGreaterThan(0);
			expect(['published', 'common practice', 'from memory']).toContain(r.firmness);
			for (const k of r.thresholds) expect(THRESHOLD_KEYS).toContain(k);
		}
	});
	test('every row of the TRADE.md mounting-rules table has a rule', () => {
		const rows: Record<string, string> = {
			'sensor sits on solid metal': 'surface.solid-metal',
			'flat, smooth seat': 'seat.flat-diameter',
			'tapped mounting hole for an M6 stud': 'hole.wall-thickness',
			'thread engagement in soft materials': 'hole.thread-engagement',
			couplant: 'mounting.couplant',
			'stud tightening torque': 'mounting.stud-torque',
			'bonded pad': 'mounting.pad-cure',
			'magnet mount': 'mounting.magnet-temporary',
			'distance to the bearing': 'distance.bearing',
			direction: 'direction.radial',
			'machine speed': 'machine.speed',
			'variable speed without a speed signal': 'machine.speed-signal',
			'surface temperature': 'surface.temperature',
			'cable route (keep-out)': 'route.keep-out',
			'cable route (fixed)': 'route.fixing',
			supply: 'route.supply-voltage',
			'hazardous area': 'machine.hazardous-area',
			'usable frequency range by mounting method': 'mounting.usable-frequency'
		};
		for (const [row, id] of Object.entries(rows)) {
			expect(RULES_BY_ID[id as keyof typeof RULES_BY_ID], row).toBeDefined();
		}
	});
	test('the 600 r/min rule cites its paper', () => {
		expect(RULES_BY_ID['machine.speed'].reference).toMatch(/Kim, Tan & Kosse 2008/);
		expect(RULES_BY_ID['machine.speed'].firmness).toBe('published');
	});
});
