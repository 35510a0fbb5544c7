// Review and approval in two browsers: the technician marks up the board and submits the
// survey; the engineer flags the point on the fan cowl with a reason and requests changes; the
// technician moves it; the engineer approves the point and the layout; the board is then
// read-only for both, and the approved revision holds the moved point.
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
let surveyUrl = '';

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	const s = await setUpBoardScenario(t, app.url);
	({ boardUrl, boardId } = s);
	surveyUrl = app.url + s.surveyPath;
	const start = await s.engineer.json('POST', `/api/v1/surveys/${s.surveyPath.split('/').pop()}/transitions`, { transition: 'start' });
	expect(start.status, await start.clone().text()).toBeLessThan(300);
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

async function transition(b: Browser, label: string, note?: string) {
	await b.page.goto(surveyUrl);
	const form = b.page
		.getByTestId('survey-actions')
		.locator('form')
		.filter({ has: b.page.getByRole('button', { name: label }) });
	if (note !== undefined) await form.locator('textarea').fill(note);
	await form.getByRole('button', { name: label }).click();
}

async function status() {
	return (await t.db.selectFrom('survey').select('status').executeTakeFirstOrThrow()).status;
}

describe('review and approval', () => {
	it('the technician marks up the board and submits the survey', async () => {
		await tech.page.goto(boardUrl);
		await waitLive(tech);
		await tech.page.getByRole('button', { name: 'Point', exact: true }).click();
		await clickCanvas(tech, 0.35, 0.45);
		await clickCanvas(tech, 0.65, 0.45);
		await tech.page.getByRole('button', { name: 'Select', exact: true }).click();
		await openPoint(tech, 'P1');
		await tech.page.getByTestId('point-surface').selectOption('sheet_cover');
		await waitLive(tech);
		await transition(tech, 'Submit for review', 'P1 is on the fan cowl: no machined face nearby.');
		await expect.poll(status).toBe('submitted');
	});

	it('the engineer flags the cover point with a reason in one tap, approves the other, and requests changes', async () => {
		await engineer.page.goto(boardUrl);
		await waitLive(engineer);
		await openPoint(engineer, 'P1');
		await engineer.page.getByTestId('flag-cover').click();
		await expect.poll(() => engineer.page.getByTestId('point-decision-reason').textContent()).toBe('On a sheet cover or guard');
		await openPoint(engineer, 'P2');
		await engineer.page.getByTestId('point-review').getByRole('button', { name: 'Approve' }).click();
		await expect
			.poll(async () => (await readBoardContent(t.db, boardId)).points.map((p) => [p.label, p.status, p.decisionReason]).sort())
			.toEqual([
				['P1', 'flagged', 'sheet_cover'],
				['P2', 'approved', null]
			]);
		await transition(engineer, 'Request changes', 'Move P1 onto the motor end shield, drive end.');
		await expect.poll(status).toBe('changes_requested');
	});

	it('the technician moves the flagged point; it stays flagged for the engineer', async () => {
		await tech.page.goto(boardUrl);
		await waitLive(tech);
		const before = (await readBoardContent(t.db, boardId)).points.find((p) => p.label === 'P1')!;
		await openPoint(tech, 'P1'); // centres P1 on the canvas
		expect(await tech.page.getByTestId('point-decision-text').textContent()).toContain('Flagged');
		const box = (await tech.page.getByTestId('board-canvas').boundingBox())!;
		await tech.page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.5);
		await tech.page.mouse.down();
		await tech.page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.62, { steps: 8 });
		await tech.page.mouse.up();
		await expect
			.poll(async () => (await readBoardContent(t.db, boardId)).points.find((p) => p.label === 'P1')!.y, { timeout: 10_000 })
			.toBeGreaterThan(before.y + 20);
		const moved = (await readBoardContent(t.db, boardId)).points.find((p) => p.label === 'P1')!;
		expect(moved.status).toBe('flagged');
		expect(await tech.page.getByTestId('not-accepted-entry').count()).toBe(0);
		await waitLive(tech);
		await transition(tech, 'Submit for review', 'Moved P1 down onto the end shield.');
		await expect.poll(status).toBe('submitted');
	});

	it('the engineer approves the point and the layout; the board is read-only for both', async () => {
		await engineer.page.goto(boardUrl);
		await waitLive(engineer);
		await openPoint(engineer, 'P1');
		await engineer.page.getByTestId('point-review').getByRole('button', { name: 'Approve' }).click();
		await expect.poll(async () => (await readBoardContent(t.db, boardId)).points.map((p) => p.status)).toEqual(['approved', 'approved']);
		await transition(engineer, 'Approve the layout');
		await expect.poll(status).toBe('approved');

		for (const b of [engineer, tech]) {
			await b.page.goto(boardUrl);
			await waitLive(b, true);
			expect(await b.page.getByRole('button', { name: 'Point', exact: true }).isDisabled()).toBe(true);
		}
		const revision = await t.db.selectFrom('revision_point').select(['label', 'status', 'y']).orderBy('label').execute();
		const stored = (await readBoardContent(t.db, boardId)).points;
		expect(revision.map((r) => [r.label, r.status, Number(r.y)])).toEqual(stored.map((p) => [p.label, p.status, p.y]).sort());
	});

	it('after reopening, the board shows what moved since the approved revision', async () => {
		await transition(engineer, 'Reopen for changes', 'P2 sits on a lifting eye; move it.');
		await expect.poll(status).toBe('walking');
		await engineer.page.goto(boardUrl);
		await waitLive(engineer);
		await openPoint(engineer, 'P2'); // centres P2
		const box = (await engineer.page.getByTestId('board-canvas').boundingBox())!;
		await engineer.page.mouse.move(box.x + box.width * 0.5, box.y + box.height * 0.5);
		await engineer.page.mouse.down();
		await engineer.page.mouse.move(box.x + box.width * 0.6, box.y + box.height * 0.5, { steps: 8 });
		await engineer.page.mouse.up();
		await waitLive(engineer);
		await engineer.page.keyboard.press('Escape');
		await engineer.page.getByRole('tab', { name: 'To do' }).click();
		await engineer.page.getByTestId('compare-links').getByRole('link', { name: 'Compare with revision 1' }).click();
		await expect.poll(() => engineer.page.getByTestId('revision-compare').textContent(), { timeout: 15_000 }).toContain('1 moved (P2)');
		await expect
			.poll(() =>
				engineer.page.evaluate(
					() =>
						(window as unknown as { Konva: { stages: Array<{ find(s: string): unknown[] }> } }).Konva.stages[0].find('.revision-ghost')
							.length
				)
			)
			.toBe(1);
		const errors = [...engineer.errors, ...tech.errors].filter((e) => !/favicon/.test(e));
		expect(errors).toEqual([]);
	});
});
