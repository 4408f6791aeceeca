/**
 * Number formats of the history views and the diff sentences. Pure, shared by server and browser,
 * so the sentence a pipeline reads from the API is the one a person sees on the page.
 */

const sig = (v: number, digits = 3) => Number(v.toPrecision(digits)).toString();

/** Fixed decimals for dB and degrees ("12.0"), with a real minus sign. */
export const fixed1 = (v: number) => minus(v.toFixed(1) === '-0.0' ? '0.0' : v.toFixed(1));

const minus = (text: string) => text.replace(/^-/, '−');

/** Seconds with an SI prefix: 0.0015 → "1.5 ms". */
export function seconds(v: number): string {
	const a = Math.abs(v);
	if (a === 0) return '0 s';
	if (a >= 1) return `${minus(sig(v))} s`;
	if (a >= 1e-3) return `${minus(sig(v * 1e3))} ms`;
	if (a >= 1e-6) return `${minus(sig(v * 1e6))} µs`;
	return `${minus(sig(v * 1e9))} ns`;
}

export function hertz(v: number): string {
	return Math.abs(v) >= 1000 ? `${sig(v / 1000)} kHz` : `${sig(v)} Hz`;
}

export const plain = (v: number) => minus(sig(v));

/** A relative change as a magnitude: 0.352 → "35 %", 0.043 → "4.3 %". */
export function percent(rel: number): string {
	const p = Math.abs(rel) * 100;
	return `${p >= 10 ? Math.round(p).toString() : Number(p.toPrecision(2)).toString()} %`;
}

export type Unit = 'dB' | 'deg' | 's' | 'samples' | 'Hz' | '';

export function withUnit(v: number, unit: Unit): string {
	switch (unit) {
		case 'dB':
			return `${fixed1(v)} dB`;
		case 'deg':
			return `${fixed1(v)}°`;
		case 's':
			return seconds(v);
		case 'samples':
			return `${plain(v)} samples`;
		case 'Hz':
			return hertz(v);
		default:
			return plain(v);
	}
}

/** Axis ticks: as few digits as the value needs ("100°", "2.5 dB", "1.5 ms"). */
export function tick(v: number, unit: Unit): string {
	if (unit === 'deg') return `${plain(v)}°`;
	if (unit === 'dB') return `${plain(v)} dB`;
	return withUnit(v, unit);
}

/** An absolute change in the figure's unit, as a magnitude ("12.0°", "2.3 dB"). */
export function amount(delta: number, unit: Unit): string {
	return withUnit(Math.abs(delta), unit);
}

export const shortSha = (sha: string | null) => (sha ? sha.slice(0, 12) : null);

export function bytes(n: number | null): string {
	if (n === null) return '—';
	if (n < 1024) return `${n} B`;
	if (n < 1024 * 1024) return `${sig(n / 1024)} KiB`;
	return `${sig(n / 1024 / 1024)} MiB`;
}
