// Steps on the board page that browser tests share.
import { expect } from 'vitest';
import type { Browser } from './browser';

/** Waits until the board is connected and everything is saved (or, read-only, says so). */
export async function waitLive(b: Browser, readOnly = false) {
	await expect.poll(() => b.page.getByTestId('connection').getAttribute('data-status'), { timeout: 15_000 }).toBe('connected');
	await expect
		.poll(() => b.page.getByTestId('connection').textContent(), { timeout: 15_000 })
		.toContain(readOnly ? 'read-only' : 'all changes saved');
}

/** Clicks the canvas at a position given as a fraction of its size. */
export async function clickCanvas(b: Browser, fx: number, fy: number) {
	const box = (await b.page.getByTestId('board-canvas').boundingBox())!;
	await b.page.mouse.click(box.x + box.width * fx, box.y + box.height * fy);
}

/** Opens a point in the side panel from the list of all points (which centres it on the canvas). */
export async function openPoint(b: Browser, label: string) {
	await b.page.keyboard.press('Escape');
	await b.page.getByRole('tab', { name: /All points/ }).click();
	await b.page.getByTestId('finding-row').filter({ hasText: label }).first().click();
	await expect.poll(() => b.page.getByTestId('point-editor').locator('h2').textContent()).toBe(`Point ${label}`);
}
