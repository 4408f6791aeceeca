/** Tick values and labels for the plot axes (log frequency, dB, degrees, linear). */

export interface Tick {
	value: number;
	/** Pixel position along the axis (x for a horizontal axis, y for a vertical one). */
	position: number;
	/** Empty for minor ticks that carry only a grid line. */
	label: string;
	major: boolean;
}

const trim = (s: string) => (s.includes('.') ? s.replace(/\.?0+$/, '') : s);

/** "0.1 Hz", "10 Hz", "1 kHz", "2.5 MHz": frequencies with SI prefixes. */
export function formatHz(hz: number, digits = 3): string {
	if (!Number.isFinite(hz)) return '—';
	const abs = Math.abs(hz);
	const [div, unit] =
		abs >= 1e6
			? [1e6, 'MHz']
			: abs >= 1e3
				? [1e3, 'kHz']
				: abs >= 1 || abs === 0
					? [1, 'Hz']
					: abs >= 1e-3
						? [1e-3, 'mHz']
						: [1e-6, 'µHz'];
	return `${trim((hz / div).toPrecision(digits))} ${unit}`;
}

/** A number with a fixed count of significant digits and a true minus sign. */
export function formatNumber(v: number, digits = 3): string {
	if (!Number.isFinite(v)) return v > 0 ? '∞' : v < 0 ? '−∞' : '—';
	const s =
		Math.abs(v) >= 1e5 || (Math.abs(v) < 1e-3 && v !== 0)
			? v.toExponential(digits - 1)
			: trim(v.toPrecision(digits));
	return s.replace(/^-/, '−');
}

/** Signed value with unit: "+4.6 dB", "−3.1 dB". */
export function formatSigned(v: number, unit: string, digits = 2): string {
	const body = formatNumber(Math.abs(v), digits + 1);
	const sign = v > 0 ? '+' : v < 0 ? '−' : '±';
	return `${sign}${body}${unit === '°' ? '' : ' '}${unit}`;
}

/** Log-axis ticks: every decade labelled (or every other one when crowded), 2…9 as minor ticks. */
export function logTicks(
	domain: [number, number],
	toPx: (v: number) => number,
	maxLabels = 8
): Tick[] {
	const [lo, hi] = domain;
	const d0 = Math.floor(Math.log10(lo));
	const d1 = Math.ceil(Math.log10(hi));
	const decades = d1 - d0;
	const every = Math.max(1, Math.ceil(decades / Math.max(1, maxLabels)));
	const out: Tick[] = [];
	for (let d = d0; d <= d1; d++) {
		for (let m = 1; m <= 9; m++) {
			const v = m * 10 ** d;
			if (v < lo * (1 - 1e-9) || v > hi * (1 + 1e-9)) continue;
			const major = m === 1;
			out.push({
				value: v,
				position: toPx(v),
				major,
				label: major && (d - d0) % every === 0 ? formatHz(v) : ''
			});
		}
	}
	return out;
}

/** The step from `steps` that gives at most `maxTicks` ticks over `span`. */
export function pickStep(span: number, steps: number[], maxTicks: number): number {
	for (const s of steps) if (span / s <= maxTicks) return s;
	const last = steps[steps.length - 1];
	return last * Math.ceil(span / last / maxTicks);
}

/** Ticks at multiples of `step` inside the domain. */
export function stepTicks(
	domain: [number, number],
	step: number,
	toPx: (v: number) => number,
	unit: string
): Tick[] {
	const out: Tick[] = [];
	const first = Math.ceil(domain[0] / step - 1e-9);
	const last = Math.floor(domain[1] / step + 1e-9);
	for (let i = first; i <= last; i++) {
		const v = i * step;
		const text = formatNumber(v === 0 ? 0 : v, 4);
		out.push({
			value: v,
			position: toPx(v),
			major: true,
			label: unit === '°' ? `${text}°` : unit ? `${text} ${unit}` : text
		});
	}
	return out;
}

/** Round a domain outwards to multiples of `step`. */
export function niceDomain(lo: number, hi: number, step: number): [number, number] {
	let a = Math.floor(lo / step) * step;
	let b = Math.ceil(hi / step) * step;
	if (a === b) {
		a -= step;
		b += step;
	}
	return [a, b];
}
