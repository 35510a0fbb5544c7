// How the live board counts the other processes: only through the adapter's public serverCount().
import { describe, expect, it } from 'vitest';
import type { Server } from 'socket.io';
import { ClusterView } from '../../../src/lib/server/collab/cluster';

function fakeIo(count: () => Promise<number>) {
	return { of: () => ({ adapter: { serverCount: count } }) } as unknown as Server;
}

describe('ClusterView', () => {
	it('sends to the others only while the adapter counts more than this process', async () => {
		let servers = 1;
		const view = new ClusterView(
			fakeIo(async () => servers),
			true,
			60_000
		);
		const sent: string[] = [];
		view.toOthers(() => sent.push('alone'));
		await new Promise((r) => setTimeout(r, 0));
		expect(sent).toEqual([]);
		expect(view.others).toBe(0);
		servers = 3;
		view.toOthers(() => sent.push('two others'));
		await new Promise((r) => setTimeout(r, 0));
		expect(sent).toEqual(['two others']);
		expect(view.others).toBe(2);
		view.close();
	});

	it('keeps the last count when the adapter cannot answer, and counts a process it hears from', async () => {
		let fail = false;
		const view = new ClusterView(
			fakeIo(async () => (fail ? Promise.reject(new Error('away')) : 2)),
			true,
			60_000
		);
		expect(await view.refresh()).toBe(1);
		fail = true;
		expect(await view.refresh()).toBe(1);
		view.close();
		const quiet = new ClusterView(
			fakeIo(() => Promise.reject(new Error('away'))),
			true,
			60_000
		);
		quiet.heard();
		expect(quiet.others).toBe(1);
		quiet.close();
	});

	it('says nobody is there when the live board runs alone', async () => {
		const view = new ClusterView(
			fakeIo(async () => 5),
			false
		);
		const sent: string[] = [];
		view.toOthers(() => sent.push('x'));
		view.heard();
		await new Promise((r) => setTimeout(r, 0));
		expect(sent).toEqual([]);
		expect(view.others).toBe(0);
	});
});
