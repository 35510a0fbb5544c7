import { describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { checkKey, diskStorage, storageConfigFromEnv } from '../../../src/lib/server/storage/index';

describe('storage', () => {
	it('disk storage puts, gets and deletes; a missing key is null', async () => {
		const s = diskStorage(mkdtempSync(join(tmpdir(), 'spotface-store-')));
		await s.put('org/a/media/b/display.png', Buffer.from('x'), 'image/png');
		expect((await s.get('org/a/media/b/display.png'))!.toString()).toBe('x');
		await s.delete('org/a/media/b/display.png');
		expect(await s.get('org/a/media/b/display.png')).toBeNull();
		await s.delete('org/a/media/b/display.png');
	});

	it('refuses keys that could leave the storage folder', () => {
		for (const bad of ['../etc/passwd', '/abs', 'a/../../b', 'a//b', '']) expect(() => checkKey(bad)).toThrow();
		expect(checkKey('org/1/machine/2/media/3/thumb.webp')).toBeTruthy();
	});

	it('chooses S3 only when a bucket is set; path style by default with a custom endpoint', () => {
		expect(storageConfigFromEnv({ S3_BUCKET: '' }, '/d')).toEqual({ kind: 'disk', dir: '/d/media' });
		expect(storageConfigFromEnv({ S3_BUCKET: 'b', S3_ENDPOINT: 'http://127.0.0.1:9000', S3_FORCE_PATH_STYLE: '' }, '/d')).toMatchObject({
			kind: 's3',
			bucket: 'b',
			forcePathStyle: true,
			region: 'us-east-1'
		});
		expect(storageConfigFromEnv({ S3_BUCKET: 'b' }, '/d')).toMatchObject({ kind: 's3', forcePathStyle: false });
	});
});
