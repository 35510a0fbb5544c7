// Where media bytes live. A small interface so that local disk (the default) and any
// S3-compatible object store are interchangeable; callers never build paths themselves.
import { mkdir, readFile, rename, rm, writeFile } from 'node:fs/promises';
import { dirname, join, resolve, sep } from 'node:path';
import { randomBytes } from 'node:crypto';
import { DeleteObjectCommand, GetObjectCommand, PutObjectCommand, S3Client } from '@aws-sdk/client-s3';

export interface Storage {
	readonly kind: 'disk' | 's3';
	put(key: string, bytes: Uint8Array, contentType: string): Promise<void>;
	/** The bytes, or null when there is no such object. */
	get(key: string): Promise<Buffer | null>;
	/** Removing a missing object is not an error. */
	delete(key: string): Promise<void>;
}

export interface S3Config {
	endpoint?: string;
	region: string;
	bucket: string;
	accessKeyId?: string;
	secretAccessKey?: string;
	forcePathStyle: boolean;
	prefix?: string;
}

export type StorageConfig = { kind: 'disk'; dir: string } | ({ kind: 's3' } & S3Config);

/** Keys are made by the server (ids and fixed names); anything else is refused. */
export function checkKey(key: string) {
	if (!/^[a-z0-9][a-z0-9/._-]{0,400}$/i.test(key) || key.includes('..') || key.includes('//')) {
		throw new Error(`invalid storage key: ${key}`);
	}
	return key;
}

export function diskStorage(dir: string): Storage {
	const root = resolve(dir);
	const path = (key: string) => {
		const p = resolve(join(root, checkKey(key)));
		if (!p.startsWith(root + sep)) throw new Error(`invalid storage key: ${key}`);
		return p;
	};
	return {
		kind: 'disk',
		async put(key, bytes) {
			const p = path(key);
			await mkdir(dirname(p), { recursive: true });
			// Write then rename, so a reader never sees half a file.
			const tmp = `${p}.${randomBytes(6).toString('hex')}.part`;
			await writeFile(tmp, bytes);
			await rename(tmp, p);
		},
		async get(key) {
			try {
				return await readFile(path(key));
			} catch (e) {
				if ((e as NodeJS.ErrnoException).code === 'ENOENT') return null;
				throw e;
			}
		},
		async delete(key) {
			await rm(path(key), { force: true });
		}
	};
}

export function s3Storage(cfg: S3Config): Storage {
	const client = new S3Client({
		endpoint: cfg.endpoint || undefined,
		region: cfg.region,
		forcePathStyle: cfg.forcePathStyle,
		credentials:
			cfg.accessKeyId && cfg.secretAccessKey ? { accessKeyId: cfg.accessKeyId, secretAccessKey: cfg.secretAccessKey } : undefined,
		// Plain checksums only when the operation needs them: several S3-compatible stores
		// do not understand the newer flexible-checksum trailers.
		requestChecksumCalculation: 'WHEN_REQUIRED',
		responseChecksumValidation: 'WHEN_REQUIRED'
	});
	const k = (key: string) => (cfg.prefix ? `${cfg.prefix.replace(/\/+$/, '')}/` : '') + checkKey(key);
	return {
		kind: 's3',
		async put(key, bytes, contentType) {
			await client.send(
				new PutObjectCommand({ Bucket: cfg.bucket, Key: k(key), Body: bytes, ContentType: contentType, ContentLength: bytes.byteLength })
			);
		},
		async get(key) {
			try {
				const r = await client.send(new GetObjectCommand({ Bucket: cfg.bucket, Key: k(key) }));
				if (!r.Body) return null;
				return Buffer.from(await r.Body.transformToByteArray());
			} catch (e) {
				const err = e as { name?: string; $metadata?: { httpStatusCode?: number } };
				if (err.name === 'NoSuchKey' || err.name === 'NotFound' || err.$metadata?.httpStatusCode === 404) return null;
				throw e;
			}
		},
		async delete(key) {
			await client.send(new DeleteObjectCommand({ Bucket: cfg.bucket, Key: k(key) }));
		}
	};
}

export function createStorage(cfg: StorageConfig): Storage {
	return cfg.kind === 's3' ? s3Storage(cfg) : diskStorage(cfg.dir);
}

/**
 * Storage settings from environment variables (S3_BUCKET switches to S3), media under
 * <dataDir>/media otherwise. Takes the variables as an argument so both SvelteKit ($env) and
 * the setup scripts (process.env) can use it.
 */
export function storageConfigFromEnv(env: Record<string, string | undefined>, dataDir: string): StorageConfig {
	if (env.S3_BUCKET) {
		return {
			kind: 's3',
			bucket: env.S3_BUCKET,
			endpoint: env.S3_ENDPOINT || undefined,
			region: env.S3_REGION || 'us-east-1',
			accessKeyId: env.S3_ACCESS_KEY_ID || undefined,
			secretAccessKey: env.S3_SECRET_ACCESS_KEY || undefined,
			forcePathStyle: (env.S3_FORCE_PATH_STYLE || (env.S3_ENDPOINT ? 'true' : 'false')) === 'true',
			prefix: env.S3_PREFIX || undefined
		};
	}
	return { kind: 'disk', dir: join(dataDir, 'media') };
}
