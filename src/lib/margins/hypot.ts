/**
 * √(a² + b²). V8's Math.hypot costs about eight times a square root, and the engine takes
 * moduli in every evaluation of L; the guard hands the rare operands whose squares would
 * overflow or underflow to Math.hypot.
 */
export function hypot(a: number, b: number): number {
	const s = a * a + b * b;
	return s > 1e-280 && s < 1e280 ? Math.sqrt(s) : Math.hypot(a, b);
}
