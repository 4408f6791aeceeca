/**
 * Per-call scratch arrays. A Float64Array of more than 8 elements keeps its memory outside V8's
 * heap (an ArrayBuffer: an allocation, external-memory accounting, a finaliser for the
 * collector), which costs about a microsecond each, more than the work most of these buffers
 * see; a plain array of doubles lives in the young generation and costs tens of nanoseconds.
 */
export function filled(n: number, value = 0): number[] {
	const out = new Array<number>(n);
	for (let i = 0; i < n; i++) out[i] = value;
	return out;
}

/**
 * `count` Float64Arrays of length n that share one buffer: for a result that must be typed (the
 * roots' re, im and offsets), one off-heap allocation instead of one per array.
 */
export function typedParts(n: number, count: number): Float64Array[] {
	const all = new Float64Array(n * count);
	const out: Float64Array[] = [];
	for (let k = 0; k < count; k++) out.push(all.subarray(k * n, (k + 1) * n));
	return out;
}
