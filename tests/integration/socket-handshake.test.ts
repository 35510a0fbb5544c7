import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { io as connect, type Socket } from 'socket.io-client';
import { createTestDatabase, type TestDatabase } from '../helpers/db';
import { startApp, type RunningApp } from '../helpers/app';
import { Client } from '../helpers/http';
import { signUpAndConfirm } from '../helpers/accounts';

let t: TestDatabase;
let app: RunningApp;
let cookie: string;

beforeAll(async () => {
	t = await createTestDatabase();
	app = await startApp({ databaseUrl: t.url });
	const c = new Client(app.url);
	await signUpAndConfirm(c, t.db, {
		organisationName: 'Socket Works',
		name: 'Sol Admin',
		email: 'sol@socket.test',
		password: 'socket pass 123'
	});
	cookie = `spotface_session=${c.sessionCookie}`;
});
afterAll(async () => {
	await app?.stop();
	await t?.drop();
});

function open(headers: Record<string, string>): Promise<{ socket: Socket; result: 'connected' | string }> {
	return new Promise((resolve) => {
		const socket = connect(app.url, { transports: ['websocket'], extraHeaders: headers, reconnection: false, forceNew: true });
		socket.on('connect', () => resolve({ socket, result: 'connected' }));
		socket.on('connect_error', (e) => resolve({ socket, result: e.message }));
	});
}

describe('socket.io handshake', () => {
	it('accepts a socket with a valid session', async () => {
		const { socket, result } = await open({ cookie });
		expect(result).toBe('connected');
		socket.close();
	});

	it('refuses a socket without a session', async () => {
		const { socket, result } = await open({});
		expect(result).toMatch(/unauthorised/);
		socket.close();
	});

	it('refuses a socket with a made-up or expired session', async () => {
		const bogus = await open({ cookie: 'spotface_session=notarealsession' });
		expect(bogus.result).toMatch(/unauthorised/);
		bogus.socket.close();
		await t.db
			.updateTable('user_session')
			.set({ expires_at: new Date(Date.now() - 1000) })
			.execute();
		const expired = await open({ cookie });
		expect(expired.result).toMatch(/unauthorised/);
		expired.socket.close();
	});
});
