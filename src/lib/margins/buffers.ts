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
