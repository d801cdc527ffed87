/**
 * Fixed-capacity ring buffer of paired numbers (time, value) backed by typed arrays.
 * The capacity never changes after construction: this is what keeps the live tracker's
 * memory bounded however long a run lasts.
 */
export class PairRing {
	readonly capacity: number;
	private readonly ts: Float64Array;
	private readonly xs: Float64Array;
	private head = 0; // index of the oldest element
	private count = 0;

	constructor(capacity: number) {
		if (!Number.isInteger(capacity) || capacity < 2) throw new RangeError('capacity must be an integer ≥ 2');
		this.capacity = capacity;
		this.ts = new Float64Array(capacity);
		this.xs = new Float64Array(capacity);
	}

	get size(): number {
		return this.count;
	}

	get full(): boolean {
		return this.count === this.capacity;
	}

	/** Appends; the caller must make room first when full (so that it can update its sums). */
	push(t: number, x: number): void {
		if (this.count === this.capacity) throw new RangeError('ring full');
		const i = (this.head + this.count) % this.capacity;
		this.ts[i] = t;
		this.xs[i] = x;
		this.count++;
	}

	shift(): void {
		if (this.count === 0) return;
		this.head = (this.head + 1) % this.capacity;
		this.count--;
	}

	clear(): void {
		this.head = 0;
		this.count = 0;
	}

	/** k-th oldest element (0 = oldest). */
	t(k: number): number {
		return this.ts[(this.head + k) % this.capacity];
	}
	x(k: number): number {
		return this.xs[(this.head + k) % this.capacity];
	}

	toJSON(): { t: number[]; x: number[] } {
		const t: number[] = [];
		const x: number[] = [];
		for (let k = 0; k < this.count; k++) {
			t.push(this.t(k));
			x.push(this.x(k));
		}
		return { t, x };
	}

	static fromJSON(capacity: number, data: { t: number[]; x: number[] }): PairRing {
		const r = new PairRing(capacity);
		const n = Math.min(data.t.length, data.x.length, capacity);
		for (let k = data.t.length - n; k < data.t.length; k++) r.push(data.t[k], data.x[k]);
		return r;
	}
}

/**
 * Fixed-capacity ring of single numbers with a median of its contents. The window is small
 * (tens of values) so a copy-and-sort per query is a constant cost.
 */
export class ValueRing {
	readonly capacity: number;
	private readonly xs: Float64Array;
	private readonly scratch: Float64Array;
	private next = 0;
	private count = 0;

	constructor(capacity: number) {
		this.capacity = capacity;
		this.xs = new Float64Array(capacity);
		this.scratch = new Float64Array(capacity);
	}

	get size(): number {
		return this.count;
	}

	push(x: number): void {
		this.xs[this.next] = x;
		this.next = (this.next + 1) % this.capacity;
		if (this.count < this.capacity) this.count++;
	}

	clear(): void {
		this.next = 0;
		this.count = 0;
	}

	median(): number {
		if (this.count === 0) return NaN;
		const s = this.scratch.subarray(0, this.count);
		s.set(this.xs.subarray(0, this.count));
		s.sort();
		const m = this.count >> 1;
		return this.count % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
	}

	values(): number[] {
		const out: number[] = [];
		for (let k = 0; k < this.count; k++) out.push(this.xs[(this.next - this.count + k + this.capacity) % this.capacity]);
		return out;
	}
}
