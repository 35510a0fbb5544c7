import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import {
	cToF,
	formatInput,
	formatQuantity,
	fromUserUnit,
	ftToM,
	fToC,
	inToMm,
	lbfFtToNm,
	mmSToInS,
	mmToIn,
	mToFt,
	nmToLbfFt,
	parseQuantity,
	quantityOfUnit,
	restateInUserUnits,
	toUserUnit,
	unitLabel,
	type Quantity
} from '../../../src/lib/trade';

describe('metric and US customary conversions', () => {
	test('inch and foot are exact by definition', () => {
		// NIST SP 811 (2008), B.8: 1 in = 2.54 cm exactly, 1 ft = 0.3048 m exactly.
		expect(inToMm(1)).toBe(25.4);
		expect(mmToIn(25.4)).toBe(1);
		expect(ftToM(1)).toBe(0.3048);
		expect(mToFt(0.3048)).toBe(1);
		// NIST SP 811 (2008), B.8: 1 mile (international) = 1609.344 m = 5280 ft exactly.
		expect(ftToM(5280)).toBeCloseTo(1609.344, 9);
		// 1 in/s = 25.4 mm/s (from the inch).
		expect(mmSToInS(25.4)).toBe(1);
	});

	test('temperature: °F = °C × 9/5 + 32', () => {
		// NIST SP 811 (2008), 4.2.1.1 and B.9: fixed points of water at standard pressure.
		expect(cToF(0)).toBe(32);
		expect(cToF(100)).toBe(212);
		expect(cToF(-40)).toBe(-40);
		expect(fToC(212)).toBe(100);
		// 80 °C (the default surface limit) is 176 °F.
		expect(cToF(80)).toBe(176);
	});

	test('torque: 1 lbf·ft = 1.355 818 N·m', () => {
		// NIST SP 811 (2008), B.8: foot pound-force (ft·lbf) = 1.355 818 E+00 N·m.
		expect(lbfFtToNm(1)).toBeCloseTo(1.355818, 6);
		// 10 N·m (the default stud torque limit) is 7.3756 lbf·ft (10 / 1.3558179483).
		expect(nmToLbfFt(10)).toBeCloseTo(7.3756, 4);
	});

	test('labels per system', () => {
		expect(unitLabel('length', 'metric')).toBe('mm');
		expect(unitLabel('length', 'us')).toBe('in');
		expect(unitLabel('velocity', 'us')).toBe('in/s');
		expect(unitLabel('temperature', 'us')).toBe('°F');
		expect(unitLabel('cable', 'us')).toBe('ft');
		expect(unitLabel('torque', 'us')).toBe('lbf·ft');
		expect(quantityOfUnit('mm')).toBe('length');
		expect(quantityOfUnit('°C')).toBe('temperature');
		expect(quantityOfUnit('N·m')).toBe('torque');
		expect(quantityOfUnit('V')).toBeNull();
		expect(quantityOfUnit('r/min')).toBeNull();
	});

	test('metric shows and reads stored values as they are', () => {
		expect(formatInput('length', 30, 'metric')).toBe('30');
		expect(parseQuantity('length', '12,5', 'metric')).toEqual({ ok: true, si: 12.5 });
		expect(parseQuantity('length', '12.5 mm', 'metric')).toEqual({ ok: true, si: 12.5 });
		expect(parseQuantity('length', '', 'metric')).toEqual({ ok: true, si: null });
	});

	test('US customary shows the converted value and stores SI', () => {
		// 30 mm / 25.4 = 1.181102… in.
		expect(formatInput('length', 30, 'us')).toBe('1.1811');
		expect(formatQuantity('length', 30, 'us')).toBe('1.18 in');
		expect(formatQuantity('temperature', 80, 'us', 0)).toBe('176 °F');
		// 2 in = 50.8 mm; 100 ft = 30.48 m; 212 °F = 100 °C.
		expect(parseQuantity('length', '2', 'us')).toEqual({ ok: true, si: 50.8 });
		expect(parseQuantity('cable', '100 ft', 'us')).toEqual({ ok: true, si: 30.48 });
		expect(parseQuantity('temperature', '212', 'us')).toEqual({ ok: true, si: 100 });
		expect(parseQuantity('torque', '7.3756', 'us')).toEqual({ ok: true, si: 10 });
		expect(fromUserUnit('velocity', 1, 'us')).toBe(25.4);
		expect(toUserUnit('velocity', 25.4, 'us')).toBe(1);
	});

	test('bad text is refused with the unit named', () => {
		const r = parseQuantity('length', 'abc', 'us', 'Ball diameter');
		expect(r).toEqual({ ok: false, message: 'Ball diameter must be a number in in.' });
		expect(parseQuantity('temperature', '1e999', 'us').ok).toBe(false);
		expect(parseQuantity('length', '1..2', 'metric').ok).toBe(false);
		expect(parseQuantity('length', '−3', 'metric')).toEqual({ ok: true, si: -3 });
	});

	const steps: Record<Quantity, number> = { length: 3, velocity: 3, temperature: 2, cable: 3, torque: 3 };
	test.each(Object.keys(steps) as Quantity[])('%s: a stored value on its SI step survives a form saved unchanged in US units', (q) => {
		const f = 10 ** steps[q];
		fc.assert(
			fc.property(fc.integer({ min: -2_000_000, max: 20_000_000 }), (k) => {
				const si = k / f;
				const shown = formatInput(q, si, 'us');
				const back = parseQuantity(q, shown, 'us');
				expect(back).toEqual({ ok: true, si });
			}),
			{ numRuns: 500 }
		);
	});
});

describe('messages restated in the person units', () => {
	test('SI values in a message read in US units; other units are left alone', () => {
		// 10000 m / 0.3048 = 32808.399 ft; 150 mm / 25.4 = 5.906 in; 80 °C = 176 °F.
		expect(restateInUserUnits('lengthM must be at most 10000 m, got 3048 m', 'us')).toBe(
			'lengthM must be at most 32808.399 ft, got 10000 ft'
		);
		expect(restateInUserUnits('check level (75 mm) below fail level (150 mm)', 'us')).toBe(
			'check level (2.953 in) below fail level (5.906 in)'
		);
		expect(restateInUserUnits('above 80 °C at 24 V, 2.5 mm² and 1.2 mm/s, 12 min', 'us')).toBe(
			'above 176 °F at 24 V, 2.5 mm² and 0.047 in/s, 12 min'
		);
		expect(restateInUserUnits('at most 10000 m', 'metric')).toBe('at most 10000 m');
	});
});
