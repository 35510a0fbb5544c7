// Work a request starts but does not wait for. Used where the answer must not depend on what the
// work finds (whether an e-mail address has an account): the response goes out first.
export function afterResponse(label: string, work: () => Promise<unknown>): void {
	setImmediate(() => {
		work().catch((err) => console.error(`[${label}]`, err instanceof Error ? err.message : err));
	});
}
