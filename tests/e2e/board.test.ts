// The live survey board in two browsers: an engineer at a laptop and a technician on a tablet
// open the same board; a point placed by one shows up in the other with its finding badge,
// a change of surface changes the badge on both, and the technician's cursor is drawn for
// the engineer. The survey and the board are made through the app's own pages.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync } from 'node:fs';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';
import { SCENARIO_PASSWORD as PASSWORD, setUpBoardScenario } from '../helpers/board-scenario';

const SHOTS = process.env.SPOTFACE_SCREENSHOTS ?? 'test-results/board';

let t: TestDatabase;
let app: RunningApp;
let engineer: Browser;
let tech: Browser;
let boardUrl = '';
let boardId = '';

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	const scenario = await setUpBoardScenario(t, app.url);
	boardUrl = scenario.boardUrl;
	boardId = scenario.boardId;
	const assigned = await t.db.selectFrom('survey_assignee').select(['user_id', 'role']).orderBy('user_id').execute();
	expect(assigned).toEqual([
		{ user_id: 'u-eng', role: 'engineer' },
		{ user_id: 'u-tech', role: 'technician' }
	]);

	engineer = await openBrowser({ width: 1280, height: 800 });
	tech = await openBrowser({ width: 820, height: 1180, touch: true });
	await signInPage(engineer.page, app.url, 'engineer@fenwick.test', PASSWORD);
	await signInPage(tech.page, app.url, 'tech@fenwick.test', PASSWORD);
	mkdirSync(SHOTS, { recursive: true });
});

afterAll(async () => {
	await engineer?.close();
	await tech?.close();
	await app?.stop();
	await t?.drop();
});

/** Clicks the canvas at a position given as a fraction of its size. */
async function clickCanvas(b: Browser, fx: number, fy: number) {
	const box = (await b.page.getByTestId('board-canvas').boundingBox())!;
	await b.page.mouse.click(box.x + box.width * fx, box.y + box.height * fy);
}

/** The markers the canvas draws (the points shape lists them: outline shape and label). */
function drawnMarks(b: Browser) {
	return b.page.evaluate(() => {
		const K = (
			window as unknown as {
				Konva: { stages: Array<{ findOne(s: string): { getAttr(k: string): Array<{ shape: string; text: string }> } }> };
			}
		).Konva;
		return K.stages[0]
			.findOne('.points')
			.getAttr('marks')
			.map((m) => ({ shape: m.shape, text: m.text }));
	});
}

async function waitLive(b: Browser) {
	await expect.poll(() => b.page.getByTestId('connection').getAttribute('data-status'), { timeout: 15_000 }).toBe('connected');
	await expect.poll(() => b.page.getByTestId('connection').textContent(), { timeout: 15_000 }).toContain('all changes saved');
}

describe('the live board in two browsers', () => {
	it('both open the board and see the connection state and each other', async () => {
		await engineer.page.goto(boardUrl);
		await tech.page.goto(boardUrl);
		await waitLive(engineer);
		await waitLive(tech);
		await expect
			.poll(() => engineer.page.getByTestId('peer').allTextContents(), { timeout: 10_000 })
			.toEqual([expect.stringContaining('Teo Technician')]);
		await expect
			.poll(() => tech.page.getByTestId('peer').allTextContents(), { timeout: 10_000 })
			.toEqual([expect.stringContaining('Esme Engineer')]);
		// The photo is drawn under the board (konva exposes its stages on window).
		await expect
			.poll(() =>
				engineer.page.evaluate(
					() => (window as unknown as { Konva: { stages: Array<{ find(s: string): unknown[] }> } }).Konva.stages[0].find('Image').length
				)
			)
			.toBe(1);
	});

	it('a point placed by the technician appears for the engineer with its finding badge', async () => {
		await tech.page.getByRole('button', { name: 'Point', exact: true }).click();
		await clickCanvas(tech, 0.4, 0.45);
		// The technician's own side panel opens the new point.
		await expect.poll(() => tech.page.getByTestId('point-editor').locator('h2').textContent()).toBe('Point P1');

		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 10_000 }).toBe('1');
		const row = engineer.page.getByTestId('finding-row').filter({ hasText: 'P1' });
		await expect.poll(() => row.count(), { timeout: 10_000 }).toBe(1);
		// A new point still lacks its surface, mounting and measurements: "Check" (triangle), not "Fail".
		await expect.poll(() => row.locator('[data-severity]').getAttribute('data-severity')).toBe('warn');
		expect(await row.locator('[data-severity]').textContent()).toContain('Check');
		expect(await row.textContent()).toContain('Choose the surface');

		// The marker on the engineer's canvas is the triangle of a "check".
		expect(await drawnMarks(engineer)).toEqual([{ shape: 'triangle', text: 'P1 · Check' }]);
		await tech.page.waitForTimeout(300);
		await waitLive(tech);
	});

	it('the engineer sets the surface to a sheet cover: both see "Fail"', async () => {
		await engineer.page.getByTestId('finding-row').filter({ hasText: 'P1' }).click();
		await engineer.page.getByTestId('point-surface').selectOption('sheet_cover');
		const techRow = tech.page.getByTestId('finding-row').filter({ hasText: 'P1' });
		await tech.page.getByRole('tab', { name: /All points/ }).click();
		await expect.poll(() => techRow.locator('[data-severity]').getAttribute('data-severity'), { timeout: 10_000 }).toBe('fail');
		expect(await techRow.textContent()).toContain('sheet-metal cover');
		// On the technician's canvas the marker is now a square, no triangle left.
		await expect.poll(() => drawnMarks(tech)).toEqual([{ shape: 'square', text: 'P1 · Fail' }]);
		await waitLive(engineer);
	});

	it('the technician’s cursor is shown to the engineer', async () => {
		// On the upright tablet the open details sheet covers the lower half of the photo: fold it.
		const fold = tech.page.getByRole('button', { name: 'Collapse the details' });
		if (await fold.count()) await fold.click();
		const box = (await tech.page.getByTestId('board-canvas').boundingBox())!;
		await tech.page.mouse.move(box.x + box.width * 0.3, box.y + box.height * 0.3);
		await tech.page.mouse.move(box.x + box.width * 0.6, box.y + box.height * 0.55, { steps: 5 });
		const cursor = engineer.page.getByTestId('remote-cursor');
		await expect.poll(() => cursor.count(), { timeout: 10_000 }).toBe(1);
		expect(await cursor.getAttribute('data-name')).toBe('Teo Technician');
		expect(await cursor.textContent()).toContain('Teo Technician');
		// The cursor travels in image coordinates: somewhere on the 1200 × 800 photo.
		const ix = Number(await cursor.getAttribute('data-x'));
		const iy = Number(await cursor.getAttribute('data-y'));
		expect(ix).toBeGreaterThan(0);
		expect(ix).toBeLessThan(1200);
		expect(iy).toBeGreaterThan(0);
		expect(iy).toBeLessThan(800);
	});

	it('undo takes back only the user’s own edit', async () => {
		// The engineer's last edit was the surface; undo restores "not chosen" for both.
		await engineer.page.getByRole('button', { name: 'Undo' }).click();
		const techRow = tech.page.getByTestId('finding-row').filter({ hasText: 'P1' });
		await expect.poll(() => techRow.locator('[data-severity]').getAttribute('data-severity'), { timeout: 10_000 }).toBe('warn');
		// The technician's point is still there: the engineer cannot undo someone else's edit.
		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points')).toBe('1');
		expect(await engineer.page.getByRole('button', { name: 'Undo' }).isDisabled()).toBe(true);
	});

	it('a keep-out zone and a cable route through it: the crossing is flagged for both', async () => {
		const p = tech.page;
		await p.getByRole('button', { name: 'Keep-out', exact: true }).click();
		for (const [fx, fy] of [
			[0.55, 0.3],
			[0.7, 0.3],
			[0.7, 0.6],
			[0.55, 0.6],
			[0.551, 0.301] // back on the first corner closes the zone
		]) {
			await clickCanvas(tech, fx, fy);
		}
		await expect.poll(() => p.getByTestId('zone-editor').count()).toBe(1);
		await p.getByTestId('zone-editor').getByLabel('What rotates here').selectOption('coupling');

		await p.getByRole('button', { name: 'Route', exact: true }).click();
		await clickCanvas(tech, 0.4, 0.45); // on P1
		await clickCanvas(tech, 0.85, 0.45);
		await p.keyboard.press('Enter');
		const crossing = p.getByTestId('keep-out-crossing');
		await expect.poll(() => crossing.textContent()).toContain('Crosses keep-out: Coupling');
		await p.getByTestId('route-end').selectOption({ label: 'Junction box (JB-3) · 24 V DC · Pump hall' });

		await engineer.page.getByRole('tab', { name: /All points/ }).click();
		const row = engineer.page.getByTestId('finding-row').filter({ hasText: 'P1' });
		await expect.poll(() => row.locator('[data-severity]').getAttribute('data-severity'), { timeout: 10_000 }).toBe('fail');
		await row.click();
		await expect.poll(() => engineer.page.getByTestId('point-editor').textContent()).toContain('keep-out zone around a rotating part');
		await waitLive(tech);
	});

	it('scale, a measurement on the photo marked as an estimate, and a tape measurement that wins', async () => {
		const p = engineer.page;
		const box = (await p.getByTestId('board-canvas').boundingBox())!;
		const drag = async (from: [number, number], to: [number, number]) => {
			await p.mouse.move(box.x + box.width * from[0], box.y + box.height * from[1]);
			await p.mouse.down();
			await p.mouse.move(box.x + box.width * to[0], box.y + box.height * to[1], { steps: 6 });
			await p.mouse.up();
		};
		await p.getByRole('button', { name: 'Scale', exact: true }).click();
		await drag([0.2, 0.85], [0.6, 0.85]);
		await p.getByLabel('Real length (mm)').fill('400');
		await p.getByRole('button', { name: 'Set scale' }).click();
		await expect.poll(() => p.getByTestId('tool-hint').textContent()).toContain('Scale set');

		await p.getByRole('tab', { name: /All points/ }).click();
		await p.getByTestId('finding-row').filter({ hasText: 'P1' }).click(); // centres P1 without zooming
		await p.getByRole('button', { name: 'Measure on the photo' }).click();
		await drag([0.5, 0.5], [0.5, 0.6]);
		// 0.1 of the canvas height against 400 mm over 0.4 of its width, at the same zoom.
		const expected = (400 * 0.1 * box.height) / (0.4 * box.width);
		const shown = Number((await p.getByTestId('measure-result').textContent())!.match(/≈ (\d+) mm/)![1]);
		// The canvas stayed put while the tools changed the hint bar.
		expect(await p.getByTestId('board-canvas').boundingBox()).toEqual(box);
		expect(Math.abs(shown - expected)).toBeLessThanOrEqual(2);
		await p.getByRole('button', { name: 'Use as distance to bearing of P1' }).click();
		await expect.poll(() => p.getByTestId('distance-source').textContent()).toMatch(/In use: ≈ \d+ mm, measured on the photo.*estimate/);

		await p.getByTestId('point-distance').fill('60');
		await p.getByTestId('point-distance').press('Enter');
		await expect.poll(() => p.getByTestId('distance-source').textContent()).toMatch(/In use: 60 mm, entered.*The photo gives ≈ \d+ mm/);
		// The technician sees the engineer's tape measurement in the point's findings.
		await tech.page.getByRole('tab', { name: /All points/ }).click();
		await tech.page.getByTestId('finding-row').filter({ hasText: 'P1' }).click();
		await expect
			.poll(() => tech.page.getByTestId('distance-source').textContent(), { timeout: 10_000 })
			.toContain('In use: 60 mm, entered');
		// The distance rule passes now, so no "measure the distance" prompt is left.
		expect(await tech.page.getByTestId('point-editor').textContent()).not.toContain('Measure the distance from the seat');
		// A wrong value is refused beside the field and not stored.
		await p.getByTestId('point-distance').fill('-5');
		await p.getByTestId('point-distance').press('Enter');
		await expect
			.poll(() => p.getByTestId('point-editor').getByRole('alert').textContent())
			.toContain('Distance to bearing must be 0 to 5000 mm');
		await expect.poll(() => p.getByTestId('distance-source').textContent()).toContain('In use: 60 mm, entered');
	});

	it('on the tablet a finger tap places a point; on the laptop P picks the point tool', async () => {
		await tech.page.getByRole('button', { name: 'Point', exact: true }).tap();
		const box = (await tech.page.getByTestId('board-canvas').boundingBox())!;
		await tech.page.touchscreen.tap(box.x + box.width * 0.3, box.y + box.height * 0.75);
		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 10_000 }).toBe('2');
		await engineer.page.getByRole('tab', { name: /All points/ }).click();
		await expect.poll(() => engineer.page.getByTestId('finding-row').filter({ hasText: 'P2' }).count()).toBe(1);

		await engineer.page.getByTestId('board-canvas').focus();
		await engineer.page.keyboard.press('p');
		expect(await engineer.page.getByRole('button', { name: 'Point', exact: true }).getAttribute('aria-pressed')).toBe('true');
		await engineer.page.keyboard.press('v');
		expect(await engineer.page.getByRole('button', { name: 'Select', exact: true }).getAttribute('aria-pressed')).toBe('true');
	});

	it('offline on the tablet: both sides keep editing and the edits merge on reconnect', async () => {
		const p = tech.page;
		await waitLive(tech);
		await tech.context.setOffline(true);
		await expect.poll(() => p.getByTestId('connection').getAttribute('data-status'), { timeout: 30_000 }).not.toBe('connected');
		await expect.poll(() => p.getByTestId('connection').textContent()).toContain('Offline · changes will be kept on this device');

		// The technician places a point with no signal; it is kept on the device.
		await p.getByRole('button', { name: 'Point', exact: true }).tap();
		const box = (await p.getByTestId('board-canvas').boundingBox())!;
		await p.touchscreen.tap(box.x + box.width * 0.6, box.y + box.height * 0.3);
		await expect.poll(() => p.getByTestId('connection').textContent()).toMatch(/Offline · 1 change/);
		await expect.poll(() => p.getByTestId('board-canvas').getAttribute('data-points')).toBe('3');

		// Meanwhile the engineer, online, adds a point of their own.
		await engineer.page.getByRole('button', { name: 'Point', exact: true }).click();
		await clickCanvas(engineer, 0.75, 0.65);
		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points')).toBe('3');

		// Back in range: both edits are on both screens and stored.
		await tech.context.setOffline(false);
		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 30_000 }).toBe('4');
		await expect.poll(() => p.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 30_000 }).toBe('4');
		await waitLive(tech);
	});

	it('a board opened before can be reopened with no signal', async () => {
		const p = tech.page;
		await p.goto(boardUrl);
		await waitLive(tech);
		await expect.poll(() => p.evaluate(() => Boolean(navigator.serviceWorker?.controller)), { timeout: 15_000 }).toBe(true);
		await p.reload(); // with the service worker in control, the page, its data and photo are kept
		await waitLive(tech);
		await tech.context.setOffline(true);
		await p.reload();
		await expect.poll(() => p.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 15_000 }).toBe('4');
		await expect.poll(() => p.getByTestId('connection').textContent()).toContain('Offline');
		await tech.context.setOffline(false);
		await waitLive(tech);
	});

	it('the board stores what was done (the server log has the point)', async () => {
		const rows = await t.db.selectFrom('board_update').select('seq').where('board_id', '=', boardId).execute();
		const board = await t.db.selectFrom('board').select(['snapshot']).where('id', '=', boardId).executeTakeFirstOrThrow();
		expect(rows.length + (board.snapshot ? 1 : 0)).toBeGreaterThan(0);
	});

	it('screenshots at tablet and laptop widths show no errors', async () => {
		await tech.context.setOffline(false);
		await tech.page.screenshot({ path: `${SHOTS}/board-820.png` });
		await tech.page.goto(boardUrl.replace(/\/boards\/.*$/, ''));
		await tech.page.screenshot({ path: `${SHOTS}/survey-820.png`, fullPage: true });
		await engineer.page.screenshot({ path: `${SHOTS}/board-1280.png` });
		// The offline tests make the browser log its failed reconnection attempts; nothing else may error.
		const errors = [...engineer.errors, ...tech.errors].filter((e) => !/favicon|ERR_INTERNET_DISCONNECTED/.test(e));
		expect(errors).toEqual([]);
	});
});
