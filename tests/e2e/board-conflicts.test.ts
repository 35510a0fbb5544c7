// Nothing a person did is thrown away. A technician works offline on a point the engineer
// approves meanwhile: back in range, that change is refused by the board policy and kept on the
// tablet in the "not accepted" tray with the reason (also after a reload), while the rest of the
// offline work is saved; from the tray it becomes a new proposal. Two people who set the same
// field while offline: the one whose value lost is told, with both values, and puts it back.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { openBrowser, signInPage, type Browser } from '../helpers/browser';
import { clickCanvas, openPoint, waitLive } from '../helpers/board-page';
import { SCENARIO_PASSWORD, setUpBoardScenario } from '../helpers/board-scenario';
import { readBoardContent } from '../helpers/collab';

let t: TestDatabase;
let app: RunningApp;
let engineer: Browser;
let tech: Browser;
let boardUrl = '';
let boardId = '';

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	({ boardUrl, boardId } = await setUpBoardScenario(t, app.url));
	engineer = await openBrowser({ width: 1280, height: 800 });
	tech = await openBrowser({ width: 820, height: 1180, touch: true });
	await signInPage(engineer.page, app.url, 'engineer@fenwick.test', SCENARIO_PASSWORD);
	await signInPage(tech.page, app.url, 'tech@fenwick.test', SCENARIO_PASSWORD);
});

afterAll(async () => {
	await engineer?.close();
	await tech?.close();
	await app?.stop();
	await t?.drop();
});

async function setFlat(b: Browser, value: string) {
	const field = b.page.getByTestId('point-flat');
	await field.fill(value);
	await field.press('Enter');
}

async function pointsOnServer() {
	const content = await readBoardContent(t.db, boardId);
	return Object.fromEntries(content.points.map((p) => [p.label, p]));
}

describe('refused and overwritten work on the live board', () => {
	it('a technician’s offline change to a point approved meanwhile is kept in the tray; the rest is saved', async () => {
		await engineer.page.goto(boardUrl);
		await tech.page.goto(boardUrl);
		await waitLive(engineer);
		await waitLive(tech);
		await tech.page.getByRole('button', { name: 'Point', exact: true }).click();
		await clickCanvas(tech, 0.35, 0.45);
		await clickCanvas(tech, 0.65, 0.45);
		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 10_000 }).toBe('2');
		await waitLive(tech);

		await tech.context.setOffline(true);
		await expect.poll(() => tech.page.getByTestId('connection').getAttribute('data-status'), { timeout: 30_000 }).not.toBe('connected');
		await tech.page.getByRole('button', { name: 'Select', exact: true }).click();
		await openPoint(tech, 'P1');
		await setFlat(tech, '10');
		await openPoint(tech, 'P2');
		await setFlat(tech, '35');
		await expect.poll(() => tech.page.getByTestId('connection').textContent()).toMatch(/Offline · 2 changes/);

		// Meanwhile the engineer approves P1.
		await openPoint(engineer, 'P1');
		await engineer.page.getByTestId('point-review').getByRole('button', { name: 'Approve' }).click();
		await expect.poll(async () => (await pointsOnServer()).P1?.status, { timeout: 10_000 }).toBe('approved');

		await tech.context.setOffline(false);
		const entry = tech.page.getByTestId('not-accepted-entry');
		await expect.poll(() => entry.count(), { timeout: 30_000 }).toBe(1);
		expect(await entry.textContent()).toContain('P1');
		expect(await entry.getByTestId('not-accepted-reason').textContent()).toMatch(/approved by Esme Engineer/i);
		// The change to P2 was not caught up in it: it is saved, and P1 keeps the server's value.
		await expect.poll(async () => (await pointsOnServer()).P2?.flatDiameterMm, { timeout: 15_000 }).toBe(35);
		expect((await pointsOnServer()).P1.flatDiameterMm).toBeNull();
		await waitLive(tech);

		// The tray survives a reload on the tablet.
		await tech.page.reload();
		await waitLive(tech);
		await expect.poll(() => tech.page.getByTestId('not-accepted-entry').count()).toBe(1);

		// From the tray, the change becomes a new proposal beside P1.
		await tech.page.getByRole('button', { name: 'Propose as a new point' }).click();
		await expect.poll(() => engineer.page.getByTestId('board-canvas').getAttribute('data-points'), { timeout: 10_000 }).toBe('3');
		await expect.poll(() => tech.page.getByTestId('not-accepted-entry').count()).toBe(0);
		// The engineer's board shows a change before it is stored: wait for the store.
		await expect.poll(async () => (await pointsOnServer()).P3?.status, { timeout: 10_000 }).toBe('proposed');
		const points = await pointsOnServer();
		expect(points.P3).toMatchObject({ status: 'proposed', flatDiameterMm: 10, createdBy: 'Teo Technician' });
		expect(points.P1).toMatchObject({ status: 'approved', flatDiameterMm: null });
	});

	it('two people set the same field offline: the one whose value lost is told, and puts it back in one tap', async () => {
		await waitLive(engineer);
		await waitLive(tech);
		await openPoint(tech, 'P2');
		await openPoint(engineer, 'P2');
		await tech.context.setOffline(true);
		await engineer.context.setOffline(true);
		await expect.poll(() => tech.page.getByTestId('connection').getAttribute('data-status'), { timeout: 30_000 }).not.toBe('connected');
		await expect.poll(() => engineer.page.getByTestId('connection').getAttribute('data-status'), { timeout: 30_000 }).not.toBe('connected');
		await setFlat(tech, '31');
		await setFlat(engineer, '33');
		await engineer.context.setOffline(false);
		await waitLive(engineer);
		await tech.context.setOffline(false);
		await waitLive(tech);

		// Yjs keeps one of the two values; exactly one person is told theirs lost.
		await expect
			.poll(async () => (await tech.page.getByTestId('overwrite').count()) + (await engineer.page.getByTestId('overwrite').count()), {
				timeout: 15_000
			})
			.toBe(1);
		const techLost = (await tech.page.getByTestId('overwrite').count()) === 1;
		const loser = techLost ? tech : engineer;
		const other = techLost ? engineer : tech;
		const [mine, theirs] = techLost ? ['31', '33'] : ['33', '31'];
		const notice = loser.page.getByTestId('overwrite');
		expect(await notice.getByTestId('overwrite-mine').textContent()).toBe(mine);
		expect(await notice.getByTestId('overwrite-theirs').textContent()).toBe(theirs);
		expect(await notice.textContent()).toContain(techLost ? 'Esme Engineer' : 'Teo Technician');
		await expect.poll(() => other.page.getByTestId('point-flat').inputValue()).toBe(theirs);

		await notice.getByRole('button', { name: 'Put mine back' }).click();
		await expect.poll(() => other.page.getByTestId('point-flat').inputValue(), { timeout: 10_000 }).toBe(mine);
		await expect.poll(async () => (await pointsOnServer()).P2.flatDiameterMm, { timeout: 10_000 }).toBe(Number(mine));
		expect(await loser.page.getByTestId('overwrite').count()).toBe(0);
	});

	it('no errors in either browser beyond the offline reconnection attempts', () => {
		const errors = [...engineer.errors, ...tech.errors].filter((e) => !/favicon|ERR_INTERNET_DISCONNECTED/.test(e));
		expect(errors).toEqual([]);
	});
});
