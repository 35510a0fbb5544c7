// As-installed records kept on the device until the server has them: a record made with no
// signal (or whose answer was lost) waits in IndexedDB, photo included, and is sent again when the
// browser is back online or the job page is opened. Each record carries its own key, so sending
// it twice stores it once. A record the server refuses stays here with the reason until the
// person discards or corrects it: field work is never dropped silently.

export interface QueuedRecord {
	recordKey: string;
	jobId: string;
	pointId: string;
	/** The form's text fields as sent. */
	fields: Record<string, string>;
	photo: Blob | null;
	photoName: string | null;
	savedAt: string;
	/** The server's reason when it refused the record (not retried until changed). */
	refused: string | null;
}

const DB_NAME = 'spotface-job-records';
const STORE = 'records';

function open(): Promise<IDBDatabase> {
	return new Promise((resolve, reject) => {
		const req = indexedDB.open(DB_NAME, 1);
		req.onupgradeneeded = () => {
			const s = req.result.createObjectStore(STORE, { keyPath: 'recordKey' });
			s.createIndex('job', 'jobId');
		};
		req.onsuccess = () => resolve(req.result);
		req.onerror = () => reject(req.error);
	});
}

async function run<T>(mode: IDBTransactionMode, fn: (s: IDBObjectStore) => IDBRequest<T>): Promise<T> {
	const db = await open();
	try {
		return await new Promise<T>((resolve, reject) => {
			const tx = db.transaction(STORE, mode);
			const req = fn(tx.objectStore(STORE));
			tx.oncomplete = () => resolve(req.result);
			tx.onerror = () => reject(tx.error);
			tx.onabort = () => reject(tx.error);
		});
	} finally {
		db.close();
	}
}

export function saveRecord(r: QueuedRecord): Promise<IDBValidKey> {
	return run('readwrite', (s) => s.put(r));
}

export function dropRecord(recordKey: string): Promise<undefined> {
	return run('readwrite', (s) => s.delete(recordKey));
}

export async function recordsOfJob(jobId: string): Promise<QueuedRecord[]> {
	const all = await run<QueuedRecord[]>('readonly', (s) => s.index('job').getAll(jobId));
	return all.sort((a, b) => a.savedAt.localeCompare(b.savedAt));
}

export type SendResult =
	| { ok: true; body: { findings: unknown[]; worst: string; photoMediaId: string | null } | { duplicate: true } }
	| { ok: false; offline: true }
	| { ok: false; offline: false; status: number; message: string };

/** Sends one record (multipart, with the photo). A network failure is `offline`, never thrown. */
export async function sendRecord(r: QueuedRecord): Promise<SendResult> {
	const body = new FormData();
	for (const [k, v] of Object.entries(r.fields)) body.set(k, v);
	body.set('recordKey', r.recordKey);
	if (r.photo) body.set('photo', r.photo, r.photoName ?? 'installed.jpg');
	let res: Response;
	try {
		res = await fetch(`/api/v1/jobs/${r.jobId}/points/${r.pointId}/record`, { method: 'POST', body, credentials: 'same-origin' });
	} catch {
		return { ok: false, offline: true };
	}
	if (res.ok) return { ok: true, body: await res.json() };
	// The server or a proxy is there but not answering properly: try again later.
	if (res.status >= 500 || res.status === 429 || res.status === 408) return { ok: false, offline: true };
	let message = `Refused (${res.status}).`;
	try {
		const p = await res.json();
		message = p.detail ?? message;
		if (p.errors)
			message +=
				' ' +
				Object.values(p.errors as Record<string, string[]>)
					.flat()
					.join(' ');
	} catch {
		// not problem+json: keep the status line
	}
	return { ok: false, offline: false, status: res.status, message };
}

/**
 * Sends every record of a job waiting on this device, oldest first. Returns what was stored and
 * what was refused; records still offline stay for the next try.
 */
export async function flushJob(jobId: string): Promise<{ sent: string[]; refused: QueuedRecord[]; waiting: number }> {
	const sent: string[] = [];
	const refused: QueuedRecord[] = [];
	let waiting = 0;
	for (const r of await recordsOfJob(jobId)) {
		if (r.refused) {
			refused.push(r);
			continue;
		}
		const res = await sendRecord(r);
		if (res.ok) {
			await dropRecord(r.recordKey);
			sent.push(r.pointId);
		} else if (res.offline) waiting++;
		else {
			const kept = { ...r, refused: res.message };
			await saveRecord(kept);
			refused.push(kept);
		}
	}
	return { sent, refused, waiting };
}
