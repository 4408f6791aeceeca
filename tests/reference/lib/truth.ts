/**
 * Margins of a generated loop from the reference alone (dense scan + independent stability), for
 * comparisons where the engine's own rational result must not stand in for the truth.
 */
import { scan, type DenseGain, type DensePhase, type Response } from './dense';
import type { Subject } from './subjects';

export interface ReferenceMargins {
	stable: boolean;
	gain: DenseGain[];
	phase: DensePhase[];
	pmDeg: number | null;
	delaySeconds: number | null;
	upperDb: number | null;
	lowerDb: number | null;
	/** rad/s where the upper / lower margin is met (0 for ω → 0). */
	upperW: number | null;
	lowerW: number | null;
}

export function referenceMargins(s: Subject): ReferenceMargins {
	const { gain, phase } = scan(s.t.L, s.t.ws);
	const stable = s.unstableAt(1) === 0;
	const best = gain.reduce<DenseGain | null>(
		(a, g) => (a === null || Math.abs(g.pmDeg) < Math.abs(a.pmDeg) ? g : a),
		null
	);
	const delay = gain.length
		? Math.min(...gain.map((g) => ((((g.pmDeg % 360) + 360) % 360) * Math.PI) / 180 / g.w))
		: null;
	// stability can only change where kL passes through −1: at k = 1/|L| of a phase crossover
	// (ω → 0 included when L(0) is finite and negative); walk outwards from k = 1 to the first change
	const ks = phase.filter((p) => p.mag > 0).map((p) => ({ k: 1 / p.mag, w: p.w }));
	const l0 = s.t.L(0);
	if (s.t.finiteAtZero && l0[0] < 0) ks.push({ k: 1 / Math.hypot(l0[0], l0[1]), w: 0 });
	const T = s.t.sampleTimeSeconds;
	const lN = T ? s.t.L(Math.PI / T) : [0, 0];
	if (T && lN[0] < 0) ks.push({ k: 1 / Math.hypot(lN[0], lN[1]), w: Math.PI / T });
	const edge = (up: boolean) => {
		const side = ks
			.filter(({ k }) => (up ? k > 1 : k < 1))
			.sort((a, b) => (up ? a.k - b.k : b.k - a.k));
		return side.find(({ k }) => s.unstableAt(k * (up ? 1 + 1e-6 : 1 - 1e-6)) !== 0) ?? null;
	};
	const upper = stable ? edge(true) : null;
	const lower = stable ? edge(false) : null;
	return {
		stable,
		gain,
		phase,
		pmDeg: best ? best.pmDeg : null,
		delaySeconds: stable ? delay : null,
		upperDb: upper && 20 * Math.log10(upper.k),
		lowerDb: lower && 20 * Math.log10(lower.k),
		upperW: upper && upper.w,
		lowerW: lower && lower.w
	};
}

const angleDiff = (a: number, b: number) => ((((a - b) % 360) + 540) % 360) - 180;

/** How far measured-data interpolation can move a crossover: by its error over the crossing slope. */
export function crossingTolerance(L: Response, w: number, what: 'gain' | 'phase') {
	const dB = (x: number) => 20 * Math.log10(Math.hypot(...L(x)));
	const deg = (x: number) => (Math.atan2(L(x)[1], L(x)[0]) * 180) / Math.PI;
	const h = 1e-4;
	const magSlope = (dB(w * (1 + h)) - dB(w * (1 - h))) / (2 * h); // dB per unit ln ω
	const phaseSlope = angleDiff(deg(w * (1 + h)), deg(w * (1 - h))) / (2 * h);
	const rel = 0.02 / Math.max(Math.abs(what === 'gain' ? magSlope : phaseSlope), 1e-9);
	return { rel, value: Math.min(1, rel) * Math.abs(what === 'gain' ? phaseSlope : magSlope) };
}
