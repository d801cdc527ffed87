/**
 * A fixed-capacity token bucket per key, in memory. Used for sign-in attempts and instrument requests.
 * `take` answers at once: allowed, or the seconds to wait (for a Retry-After header).
 */
export class RateLimiter {
	private buckets = new Map<string, { tokens: number; updatedMs: number }>();

	constructor(
		private readonly capacity: number,
		private readonly refillPerSecond: number,
		private readonly now: () => number = Date.now,
		private readonly maxKeys = 10_000
	) {}

	take(key: string, cost = 1): { allowed: true } | { allowed: false; retryAfterS: number } {
		const nowMs = this.now();
		let bucket = this.buckets.get(key);
		if (!bucket) {
			if (this.buckets.size >= this.maxKeys) this.evictFull(nowMs);
			bucket = { tokens: this.capacity, updatedMs: nowMs };
			this.buckets.set(key, bucket);
		}
		bucket.tokens = Math.min(this.capacity, bucket.tokens + ((nowMs - bucket.updatedMs) / 1000) * this.refillPerSecond);
		bucket.updatedMs = nowMs;
		if (bucket.tokens >= cost) {
			bucket.tokens -= cost;
			return { allowed: true };
		}
		return { allowed: false, retryAfterS: Math.max(1, Math.ceil((cost - bucket.tokens) / this.refillPerSecond)) };
	}

	/** Give back what a successful attempt cost (a correct password should not count against the user). */
	refund(key: string, cost = 1): void {
		const bucket = this.buckets.get(key);
		if (bucket) bucket.tokens = Math.min(this.capacity, bucket.tokens + cost);
	}

	private evictFull(nowMs: number): void {
		for (const [key, b] of this.buckets) {
			if (b.tokens + ((nowMs - b.updatedMs) / 1000) * this.refillPerSecond >= this.capacity) this.buckets.delete(key);
		}
		if (this.buckets.size >= this.maxKeys) this.buckets.clear();
	}
}
