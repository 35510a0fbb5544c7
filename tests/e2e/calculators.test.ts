import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';
import { seedDemo } from '../../src/lib/server/db/seed';

let t: TestDatabase;
let app: RunningApp;
let b: Browser;

beforeAll(async () => {
	t = await createTestDatabase();
	await seedDemo(t.db);
	app = await startApp({ databaseUrl: t.url });
	b = await openBrowser({ width: 1180 });
	await signInPage(b.page, app.url, 'engineer@harrowgate.example', 'spotface-demo');
});
afterAll(async () => {
	await b?.close();
	await app?.stop();
	await t?.drop();
});

const number = (s: string | null) => Number((s ?? '').replace(/[^\d.−-]/g, '').replace('−', '-'));

describe('calculators in the browser', () => {
	it('bearing frequencies update as you type, and the chart is drawn', async () => {
		const p = b.page;
		await p.goto(`${app.url}/calculators`);
		await expect.poll(() => p.getByRole('link', { name: 'Calculators' }).first().getAttribute('aria-current')).toBe('page');
		// Case Western Reserve University Bearing Data Center, drive-end bearing 6205:
		// n = 9, d = 0.3126 in, D = 1.537 in, φ = 0, at 1797 r/min (one of its test speeds).
		await p.getByLabel('Rolling elements, n').fill('9');
		await p.getByLabel('Ball diameter, d').fill('0.3126');
		await p.getByLabel('Pitch diameter, D').fill('1.537');
		await p.getByLabel('Contact angle, φ').fill('0');
		await p.getByLabel('Shaft speed').fill('1797');
		// CWRU Bearing Data Center: BPFI = 5.4152 × f_r = 5.4152 × 29.95 Hz ≈ 162.2 Hz.
		await expect.poll(async () => number(await p.locator('[data-result="bpfi-hz"]').textContent())).toBeCloseTo(162.2, 1);
		expect(await p.locator('[data-result="bpfi-hz"]').textContent()).toMatch(/Hz$/);
		expect(number(await p.locator('[data-result="bpfi-orders"]').textContent())).toBeCloseTo(5.4152, 3); // CWRU: BPFI 5.4152 × f_r
		expect(number(await p.locator('[data-result="bpfo-orders"]').textContent())).toBeCloseTo(3.5848, 3); // CWRU: BPFO 3.5848 × f_r
		expect(number(await p.locator('[data-result="ftf-orders"]').textContent())).toBeCloseTo(0.3983, 3); // CWRU: FTF 0.39828 × f_r

		// Four frequencies × three harmonics drawn on the canvas, with the inner-race markers in their colour.
		const canvas = p.getByTestId('defect-chart');
		await expect.poll(() => canvas.getAttribute('data-drawn')).toBe('12');
		const drawn = await canvas.evaluate((c: HTMLCanvasElement) => {
			const d = c.getContext('2d')!.getImageData(0, 0, c.width, c.height).data;
			let painted = 0;
			let bpfi = 0;
			for (let i = 0; i < d.length; i += 4) {
				if (d[i + 3] > 0) painted++;
				if (Math.abs(d[i] - 0xb3) < 12 && Math.abs(d[i + 1] - 0x26) < 12 && Math.abs(d[i + 2] - 0x1e) < 12 && d[i + 3] > 200) bpfi++;
			}
			return { painted, bpfi, width: c.width, height: c.height };
		});
		expect(drawn.width).toBeGreaterThan(300);
		expect(drawn.painted).toBeGreaterThan(drawn.width * drawn.height * 0.1); // bands, axes and markers
		expect(drawn.bpfi).toBeGreaterThan(50);

		// The default ranges see all twelve lines; the table says so per mounting.
		expect(await p.locator('[data-mounting="hand_held"]').textContent()).toContain('sees all 12 lines');
	});

	it('a geometry that cannot be right shows the message beside the field, and clears when corrected', async () => {
		const p = b.page;
		await p.getByLabel('Ball diameter, d').fill('2');
		const err = p.locator('[data-field-error="ballD"]');
		await expect.poll(() => err.textContent()).toMatch(/must be smaller than pitch diameter/);
		expect(await p.locator('[data-result="bpfi-hz"]').count()).toBe(0);
		await p.getByLabel('Ball diameter, d').fill('abc');
		await expect.poll(() => err.textContent()).toMatch(/enter a number/);
		await p.getByLabel('Ball diameter, d').fill('0.3126');
		await expect.poll(() => err.count()).toBe(0);
		await expect.poll(async () => number(await p.locator('[data-result="bpfi-hz"]').textContent())).toBeCloseTo(162.2, 1);
	});

	it('cable voltage drop and the voltage at the sensor, judged against the supply window', async () => {
		const p = b.page;
		await p.getByLabel('Route length (one way)').fill('50');
		await p.getByLabel('Conductor cross-section').selectOption('1.5');
		await p.getByLabel('Conductor class (IEC 60228)').selectOption('5');
		await p.getByLabel('Current', { exact: true }).fill('2');
		// TRADE.md check value, derived from IEC 60228: 50 m, 1.5 mm² class 5, 2 A → 2.66 V.
		await expect.poll(() => p.locator('[data-result="drop"]').textContent()).toBe('2.66 V');
		expect(await p.locator('[data-result="at-sensor"]').textContent()).toBe('21.34 V');
		// Within the 20.4 V minimum but the supply was assumed, not measured: a check, shown with shape and word.
		const finding = p.getByTestId('cable-finding').locator('[data-severity]').first();
		expect(await finding.getAttribute('data-severity')).toBe('warn');
		expect(await p.getByTestId('cable-finding').locator('[data-shape="triangle"]').count()).toBe(1);
		expect(await p.getByTestId('cable-finding').textContent()).toContain('Check');
		await p.getByLabel('Supply voltage, measured').fill('24');
		await expect.poll(() => finding.getAttribute('data-severity')).toBe('pass');
		// Twice as long drops twice as much: 18.68 V is below 20.4 V (IEC 61131-2 window, percentages from memory).
		await p.getByLabel('Route length (one way)').fill('100');
		await expect.poll(() => finding.getAttribute('data-severity')).toBe('fail');
		expect(await p.getByTestId('cable-finding').textContent()).toContain('Fail');
		// The explanation and reference are there on demand.
		await p.getByTestId('cable-finding').getByText('Why?').click();
		await expect.poll(() => p.getByTestId('cable-finding').textContent()).toContain('IEC 60228');
		await p.getByLabel('Route length (one way)').fill('-3');
		await expect.poll(() => p.locator('[data-field-error="length"]').textContent()).toMatch(/Length must be at least 0 m/);
	});

	it('ISO 10816-3 zone: a reading on a boundary goes to the upper zone', async () => {
		const p = b.page;
		await p.getByLabel('Machine group').selectOption('2');
		await p.getByLabel('Foundation').selectOption('rigid');
		// ISO 10816-3 Table A.1 (via TRADE.md): group 2, rigid, B/C boundary 2.8 mm/s.
		await p.getByLabel('Velocity, r.m.s.').fill('2.8');
		await expect.poll(() => p.getByTestId('zone-result').getAttribute('data-zone')).toBe('C');
		await p.getByLabel('Velocity, r.m.s.').fill('2.79');
		await expect.poll(() => p.getByTestId('zone-result').getAttribute('data-zone')).toBe('B');
	});

	it('unit conversions: 1 g peak at 100 Hz is 15.608 mm/s peak', async () => {
		const p = b.page;
		await p.getByLabel('Quantity').selectOption('accel_g');
		await p.getByLabel('Amplitude').selectOption('peak');
		await p.getByLabel('Value', { exact: true }).fill('1');
		await p.locator('input[name="freq"]').fill('100');
		// TRADE.md check value (derived): 9.80665 / (2π·100) m/s = 15.608 mm/s peak.
		await expect.poll(() => p.locator('[data-result="velocity"] [data-amp="peak"]').textContent()).toBe('15.608 mm/s');
		expect(await p.locator('[data-result="velocity"] [data-amp="rms"]').textContent()).toBe('11.036 mm/s');
		await p.getByLabel('Value', { exact: true }).fill('-1');
		await expect.poll(() => p.locator('[data-field-error="value"]').textContent()).toMatch(/Amplitude must be at least 0/);
	});

	it('the mounting ranges follow the organisation thresholds', async () => {
		const p = b.page;
		const res = await p.request.put(`${app.url}/api/v1/settings/thresholds`, { data: { usableFreqHandHeldHz: 300 } });
		expect(res.status()).toBe(200);
		await p.goto(`${app.url}/calculators`);
		await p.getByLabel('Rolling elements, n').fill('9');
		await p.getByLabel('Ball diameter, d').fill('0.3126');
		await p.getByLabel('Pitch diameter, D').fill('1.537');
		await p.getByLabel('Shaft speed').fill('1797');
		const row = p.locator('[data-mounting="hand_held"]');
		await expect.poll(() => row.textContent()).toContain('BPFI 2×');
		expect(await row.locator('[data-severity]').getAttribute('data-severity')).toBe('fail');
		expect(await row.textContent()).toContain('300 Hz');
		expect(b.errors).toEqual([]);
	});
});

describe('thresholds page in the browser', () => {
	it('a negative value shows its error beside the field and keeps what was typed', async () => {
		const p = b.page;
		await p.goto(`${app.url}/settings/thresholds`);
		await p.getByLabel('Distance to bearing: fail above').fill('-5');
		await p.getByRole('button', { name: 'Save thresholds' }).click();
		const err = p.locator('[data-threshold="distanceFailMm"] [data-field-error="distanceFailMm"]');
		await expect.poll(() => err.textContent()).toMatch(/cannot be negative/);
		expect(await p.getByLabel('Distance to bearing: fail above').inputValue()).toBe('-5');
		const row = await t.db.selectFrom('organisation').select('settings').executeTakeFirstOrThrow();
		expect((row.settings as { thresholds?: Record<string, number> }).thresholds).toEqual({ usableFreqHandHeldHz: 300 });

		await p.getByLabel('Distance to bearing: fail above').fill('120');
		await p.getByRole('button', { name: 'Save thresholds' }).click();
		await expect
			.poll(async () => ((await err.count()) ? await err.textContent() : await p.getByText('Saved.', { exact: true }).count()))
			.toBe(1);

		await p.getByText('Reset to defaults…').click();
		await p.getByRole('button', { name: 'Yes, reset to defaults' }).click();
		await expect.poll(() => p.getByText('Back to the defaults.', { exact: true }).count()).toBe(1);
		expect(await p.getByLabel('Distance to bearing: fail above').inputValue()).toBe('150');
		expect(b.errors).toEqual([]);
	});
});
