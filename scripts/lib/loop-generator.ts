/**
 * Seeded random feedback loops, shared by the reference tests and the margins benchmark so that a
 * loop one of them flags can be replayed in the other from its seed alone.
 *
 * A loop is built from first- and second-order sections (real pole, complex pole pair,
 * integrator, each with at most as many zeros as poles), so every section is proper and the
 * cascade state-space realisation stays well scaled even when the expanded polynomial is not.
 */

export type Complex = [number, number];
export type LoopDomain = 'continuous' | 'z' | 'zoh';
export type Representation = 'polynomial' | 'factored' | 'sections' | 'state-space';

/** mulberry32: tiny, fast and good enough for test data; the same seed gives the same loop everywhere. */
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

export interface Section {
	/** Every complex root is listed with its conjugate. */
	poles: Complex[];
	zeros: Complex[];
}

export interface GeneratedLoop {
	seed: number;
	domain: LoopDomain;
	/** Number of poles of the rational part. */
	order: number;
	sampleTimeSeconds?: number;
	gain: number;
	/** Roots in s (continuous, zoh) or in z (z). */
	sections: Section[];
	representation: Representation;
	/** Common factor applied to numerator and denominator of polynomial blocks (tests normalisation). */
	coefficientScale: number;
	/** Expanded transfer in descending powers of s (continuous, zoh) or z (z); gain in num. */
	num: number[];
	den: number[];
	/** Rad/s the gain was tuned to cross at. */
	targetCrossover: number;
}

export function conv(a: number[], b: number[]): number[] {
	const out = new Array(a.length + b.length - 1).fill(0);
	for (let i = 0; i < a.length; i++) for (let j = 0; j < b.length; j++) out[i + j] += a[i] * b[j];
	return out;
}

/** Real polynomial (descending) from roots; conjugate pairs are multiplied out as quadratics. */
export function polyFromRoots(roots: Complex[]): number[] {
	let p = [1];
	for (let i = 0; i < roots.length; i++) {
		const [re, im] = roots[i];
		if (im === 0) p = conv(p, [1, -re]);
		else if (im > 0) p = conv(p, [1, -2 * re, re * re + im * im]);
	}
	return p;
}

/** Complex Horner evaluation of a real polynomial (descending) at x. */
export function polyval(p: number[], x: Complex): Complex {
	let re = 0;
	let im = 0;
	for (const c of p) {
		const r = re * x[0] - im * x[1] + c;
		im = re * x[1] + im * x[0];
		re = r;
	}
	return [re, im];
}

const flatRoots = new WeakMap<GeneratedLoop, { zeros: Float64Array; poles: Float64Array }>();

/** L at a point of the s- or z-plane, from the roots (accurate where the expanded polynomial is not). */
export function rootsResponse(loop: GeneratedLoop, x: Complex): Complex {
	let flat = flatRoots.get(loop);
	if (!flat) {
		const pack = (rs: Complex[]) => Float64Array.from(rs.flat());
		flat = {
			zeros: pack(loop.sections.flatMap((s) => s.zeros)),
			poles: pack(loop.sections.flatMap((s) => s.poles))
		};
		flatRoots.set(loop, flat);
	}
	// hot path of every dense scan: plain arithmetic, no allocation per factor
	const [xr, xi] = x;
	let nr = loop.gain;
	let ni = 0;
	const z = flat.zeros;
	for (let i = 0; i < z.length; i += 2) {
		const a = xr - z[i];
		const b = xi - z[i + 1];
		const t = nr * a - ni * b;
		ni = nr * b + ni * a;
		nr = t;
	}
	let dr = 1;
	let di = 0;
	const p = flat.poles;
	for (let i = 0; i < p.length; i += 2) {
		const a = xr - p[i];
		const b = xi - p[i + 1];
		const t = dr * a - di * b;
		di = dr * b + di * a;
		dr = t;
	}
	const d = dr * dr + di * di;
	return [(nr * dr + ni * di) / d, (ni * dr - nr * di) / d];
}

const logUniform = (rng: () => number, lo: number, hi: number) => lo * Math.pow(hi / lo, rng());

function randomSections(rng: () => number, order: number, w0: number): Section[] {
	const sections: Section[] = [];
	let left = order;
	if (left >= 1 && rng() < 0.3) {
		sections.push({ poles: [[0, 0]], zeros: [] });
		left--;
		if (left >= 3 && rng() < 0.15) {
			sections.push({ poles: [[0, 0]], zeros: [] });
			left--;
		}
	}
	while (left > 0) {
		if (left >= 2 && rng() < 0.4) {
			const wn = w0 * logUniform(rng, 0.1, 20);
			const zeta = logUniform(rng, 0.05, 0.9);
			const pole: Complex = [-zeta * wn, wn * Math.sqrt(1 - zeta * zeta)];
			const zeros: Complex[] = [];
			const r = rng();
			if (r < 0.2) {
				const wz = w0 * logUniform(rng, 0.1, 20);
				const zz = logUniform(rng, 0.02, 0.8);
				zeros.push(
					[-zz * wz, wz * Math.sqrt(1 - zz * zz)],
					[-zz * wz, -wz * Math.sqrt(1 - zz * zz)]
				);
			} else if (r < 0.4) zeros.push([(rng() < 0.15 ? 1 : -1) * w0 * logUniform(rng, 0.1, 20), 0]);
			sections.push({ poles: [pole, [pole[0], -pole[1]]], zeros });
			left -= 2;
		} else {
			const zeros: Complex[] =
				rng() < 0.3 ? [[(rng() < 0.15 ? 1 : -1) * w0 * logUniform(rng, 0.1, 20), 0]] : [];
			sections.push({ poles: [[-w0 * logUniform(rng, 0.1, 20), 0]], zeros });
			left--;
		}
	}
	return sections;
}

/** Maps s-plane roots to z = e^{sT} (integrators land on z = 1); zero-free sections may get a zero at z = −1 (Tustin-like). */
function toZ(sections: Section[], T: number, rng: () => number): Section[] {
	const map = ([re, im]: Complex): Complex => {
		const m = Math.exp(re * T);
		return [m * Math.cos(im * T), m * Math.sin(im * T)];
	};
	return sections.map((s) => {
		const poles = s.poles.map(map);
		const zeros = s.zeros.map(map);
		if (zeros.length < poles.length && rng() < 0.25) zeros.push([-1, 0]);
		return { poles, zeros };
	});
}

const PICK_DOMAIN: LoopDomain[] = ['continuous', 'z', 'zoh'];

/** One loop from one seed. Domain and order come from the seed unless asked for. */
export function generateLoop(
	seed: number,
	want: { domain?: LoopDomain; order?: number } = {}
): GeneratedLoop {
	const rng = mulberry32(seed);
	const domain = want.domain ?? PICK_DOMAIN[Math.floor(rng() * 3)];
	const order = want.order ?? 1 + Math.floor(rng() * 10);
	const w0 = logUniform(rng, 0.1, 1000);
	// a z-domain loop often carries a one-sample computational delay (a pole at z = 0)
	const computationalDelay = domain === 'z' && order >= 2 && rng() < 0.3;
	let sections = randomSections(rng, computationalDelay ? order - 1 : order, w0);
	let T: number | undefined;
	if (domain !== 'continuous') {
		T = (2 * Math.PI) / (w0 * logUniform(rng, 5, 100));
		// round to 6 significant digits so the file and the Octave script carry the same number
		T = Number(T.toPrecision(6));
	}
	if (domain === 'z') sections = toZ(sections, T!, rng);
	if (computationalDelay) sections.push({ poles: [[0, 0]], zeros: [] });
	const reps: Representation[] =
		domain === 'zoh'
			? ['polynomial', 'factored', 'state-space']
			: ['polynomial', 'factored', 'sections', 'state-space'];
	const representation = reps[Math.floor(rng() * reps.length)];
	const coefficientScale = rng() < 0.5 ? logUniform(rng, 0.01, 100) : 1;
	const wHi = domain === 'continuous' ? w0 * 20 : Math.min(w0 * 20, (0.8 * Math.PI) / T!);
	let wc = logUniform(rng, w0 * 0.05, wHi);
	const loop: GeneratedLoop = {
		seed,
		domain,
		order,
		sampleTimeSeconds: T,
		gain: 1,
		sections,
		representation,
		coefficientScale,
		num: [],
		den: [],
		targetCrossover: wc
	};
	const denMonic = polyFromRoots(sections.flatMap((s) => s.poles));
	const numMonic = polyFromRoots(sections.flatMap((s) => s.zeros));
	const point = (w: number): Complex =>
		domain === 'z' ? [Math.cos(w * T!), Math.sin(w * T!)] : [0, w];
	// "stable-ish": halve the crossover until the phase there leaves 20°–150° of margin. Some loops stay
	// unstable (several crossovers, right-half-plane zeros): that is wanted. When no try gives the
	// margin, keep the first — pushing on would leave |L(0)| ≈ 1 and a closed-loop pole at ~0.
	const tune = (w: number) => {
		loop.gain = 1;
		const [re, im] = rootsResponse(loop, point(w));
		loop.gain = Number((1 / Math.hypot(re, im)).toPrecision(8));
		loop.targetCrossover = w;
		return 180 + (Math.atan2(im, re) * 180) / Math.PI;
	};
	const first = wc;
	let ok = false;
	for (let attempt = 0; attempt < 10 && !ok; attempt++, wc /= 2) {
		const pm = tune(wc);
		// above 150° L is nearly +1: a crossover in the flat low-frequency part, which says little
		ok = pm >= 20 && pm <= 150;
	}
	if (!ok) tune(first);
	loop.num = numMonic.map((c) => c * loop.gain);
	loop.den = denMonic;
	return loop;
}

interface StateSpace {
	a: number[][];
	b: number[];
	c: number[];
	d: number;
}

/** Controllable canonical form of one proper section N/D (D monic). */
function sectionSS(num: number[], den: number[]): StateSpace {
	const n = den.length - 1;
	const b = [...new Array(n + 1 - num.length).fill(0), ...num];
	const d = b[0];
	const a = Array.from({ length: n }, (_, i) =>
		Array.from({ length: n }, (_, j) => (i === 0 ? -den[j + 1] : j === i - 1 ? 1 : 0))
	);
	return {
		a,
		b: Array.from({ length: n }, (_, i) => (i === 0 ? 1 : 0)),
		c: b.slice(1).map((bi, i) => bi - d * den[i + 1]),
		d
	};
}

/** x = [x1; x2]: the second system is fed by the first. */
function series(s1: StateSpace, s2: StateSpace): StateSpace {
	const n1 = s1.a.length;
	const n2 = s2.a.length;
	const a = Array.from({ length: n1 + n2 }, (_, i) =>
		Array.from({ length: n1 + n2 }, (_, j) =>
			i < n1 ? (j < n1 ? s1.a[i][j] : 0) : j < n1 ? s2.b[i - n1] * s1.c[j] : s2.a[i - n1][j - n1]
		)
	);
	return {
		a,
		b: [...s1.b, ...s2.b.map((x) => x * s1.d)],
		c: [...s1.c.map((x) => x * s2.d), ...s2.c],
		d: s1.d * s2.d
	};
}

/** Cascade realisation of the whole loop, gain folded into C and D. */
export function cascadeStateSpace(loop: GeneratedLoop): StateSpace {
	let ss = loop.sections
		.map((s) => sectionSS(polyFromRoots(s.zeros), polyFromRoots(s.poles)))
		.reduce((acc, s) => series(acc, s));
	ss = { ...ss, c: ss.c.map((x) => x * loop.gain), d: ss.d * loop.gain };
	return ss;
}

const rootJson = ([re, im]: Complex) => (im === 0 ? re : [re, im]);

/** The loop as a `headroom-loop-model/1` object; extra top-level fields (delay, cases) are merged in. */
export function toLoopModel(
	loop: GeneratedLoop,
	extra: Record<string, unknown> = {}
): Record<string, unknown> {
	const disc = loop.domain === 'zoh' ? { domain: 's', discretize: 'zoh' } : {};
	const k = loop.coefficientScale;
	let blocks: Record<string, unknown>[];
	if (loop.representation === 'polynomial')
		blocks = [
			{
				type: 'polynomial',
				numerator: loop.num.map((c) => c * k),
				denominator: loop.den.map((c) => c * k),
				...disc
			}
		];
	else if (loop.representation === 'factored')
		blocks = [
			{
				type: 'factored',
				gain: loop.gain,
				...disc,
				zeros: loop.sections.flatMap((s) => s.zeros).map(rootJson),
				poles: loop.sections.flatMap((s) => s.poles).map(rootJson)
			}
		];
	else if (loop.representation === 'sections')
		blocks = loop.sections.map((s, i) =>
			i % 2 === 0
				? {
						type: 'factored',
						gain: i === 0 ? loop.gain : 1,
						zeros: s.zeros.map(rootJson),
						poles: s.poles.map(rootJson)
					}
				: {
						type: 'polynomial',
						numerator: polyFromRoots(s.zeros),
						denominator: polyFromRoots(s.poles)
					}
		);
	else {
		const ss = cascadeStateSpace(loop);
		blocks = [
			{ type: 'state-space', a: ss.a, b: ss.b.map((x) => [x]), c: [ss.c], d: [[ss.d]], ...disc }
		];
	}
	const model: Record<string, unknown> = {
		format: 'headroom-loop-model/1',
		title: `generated loop, seed ${loop.seed} (${loop.domain}, order ${loop.order}, ${loop.representation})`
	};
	if (loop.sampleTimeSeconds !== undefined) model.sampleTimeSeconds = loop.sampleTimeSeconds;
	return { ...model, blocks, ...extra };
}

/**
 * A continuous loop's response sampled at the given frequencies, as a measured-block model (phase
 * wrapped to ±180° as an analyser reports it). This is how measured loops get a known truth.
 */
export function toMeasuredModel(
	loop: GeneratedLoop,
	hz: number[],
	openLoopUnstablePoles = 0
): Record<string, unknown> {
	const resp = hz.map((h) => rootsResponse(loop, [0, 2 * Math.PI * h]));
	return {
		format: 'headroom-loop-model/1',
		title: `measured from generated loop, seed ${loop.seed}`,
		blocks: [
			{
				type: 'measured',
				hz,
				openLoopUnstablePoles,
				magnitudeDb: resp.map(([re, im]) => 20 * Math.log10(Math.hypot(re, im))),
				phaseDeg: resp.map(([re, im]) => (Math.atan2(im, re) * 180) / Math.PI)
			}
		]
	};
}

/** n log-spaced frequencies from lo to hi. */
export const logSpace = (lo: number, hi: number, n: number) =>
	Array.from({ length: n }, (_, i) => lo * (hi / lo) ** (i / (n - 1)));
