/** A token bucket: `burst` messages at once, then `perSecond` on average. */
export class TokenBucket {
	#tokens: number;
	#last: number;
	constructor(
		private readonly perSecond: number,
		private readonly burst: number,
		private readonly now: () => number = () => performance.now()
	) {
		this.#tokens = burst;
		this.#last = this.now();
	}

	/** Takes one token; false when the bucket is empty. */
	take(): boolean {
		const t = this.now();
		this.#tokens = Math.min(this.burst, this.#tokens + ((t - this.#last) / 1000) * this.perSecond);
		this.#last = t;
		if (this.#tokens < 1) return false;
		this.#tokens -= 1;
		return true;
	}
}
