// Seeded pseudo-random numbers, so that a run is reproducible from its seed alone.
// mulberry32: 32-bit state, fast, good enough for noise (not for anything secret).

export interface Rng {
	/** Uniform in [0, 1). */
	next(): number;
	/** Standard normal (mean 0, sd 1), Box–Muller. */
	normal(): number;
	/** An independent stream derived from this seed and a label, so that adding noise
	 *  to one part of the model does not shift the random numbers of another. */
	fork(label: string): Rng;
}

export function mulberry32(seed: number): () => number {
	let a = seed >>> 0;
	return () => {
		a = (a + 0x6d2b79f5) >>> 0;
		let t = a;
		t = Math.imul(t ^ (t >>> 15), t | 1);
		t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
		return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
	};
}

/** FNV-1a over the label, mixed with the seed: a stable 32-bit sub-seed. */
export function deriveSeed(seed: number, label: string): number {
	let h = (0x811c9dc5 ^ (seed >>> 0)) >>> 0;
	for (let i = 0; i < label.length; i++) {
		h ^= label.charCodeAt(i);
		h = Math.imul(h, 0x01000193) >>> 0;
	}
	// one extra avalanche round so that nearby seeds give unrelated streams
	h ^= h >>> 16;
	h = Math.imul(h, 0x85ebca6b) >>> 0;
	h ^= h >>> 13;
	return h >>> 0;
}

export function createRng(seed: number, label = ''): Rng {
	const uniform = mulberry32(deriveSeed(seed, label));
	let spare: number | null = null;
	return {
		next: uniform,
		normal() {
			if (spare !== null) {
				const s = spare;
				spare = null;
				return s;
			}
			let u = 0;
			while (u <= Number.EPSILON) u = uniform();
			const v = uniform();
			const r = Math.sqrt(-2 * Math.log(u));
			spare = r * Math.sin(2 * Math.PI * v);
			return r * Math.cos(2 * Math.PI * v);
		},
		fork(sub: string) {
			return createRng(seed, `${label}/${sub}`);
		}
	};
}
