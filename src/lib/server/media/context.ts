// The storage and upload limits of this process, from the environment (read once).
import { env } from '$env/dynamic/private';
import { context } from '../context';
import { createStorage, storageConfigFromEnv, type Storage } from '../storage/index';
import { DEFAULT_LIMITS, type MediaLimits } from './process';

let cached: { storage: Storage; limits: MediaLimits } | null = null;

function positive(v: string | undefined, fallback: number) {
	const n = Number(v);
	return Number.isFinite(n) && n > 0 ? Math.floor(n) : fallback;
}

export function mediaContext() {
	if (cached) return cached;
	cached = {
		storage: createStorage(storageConfigFromEnv(env, context().config.dataDir)),
		limits: {
			...DEFAULT_LIMITS,
			maxBytes: positive(env.MEDIA_MAX_BYTES, DEFAULT_LIMITS.maxBytes),
			maxPixels: positive(env.MEDIA_MAX_PIXELS, DEFAULT_LIMITS.maxPixels),
			pdfRenderMaxPixels: positive(env.MEDIA_PDF_RENDER_MAX_PIXELS, DEFAULT_LIMITS.pdfRenderMaxPixels)
		}
	};
	return cached;
}
