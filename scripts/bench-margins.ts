/**
 * `npm run bench:margins`: the margin engine against Octave's control-package `margin` on the same
 * seeded rational loops (orders 1–10, continuous and z-domain), plus measured (500-point) and
 * delayed loops timed alone, and parse time on its own. It prints; it never asserts, because
 * timings depend on the machine (targets: ≤ 100 µs per rational loop and ≥ 20× faster than Octave;
 * ≤ 1 ms for measured and delayed loops).
 */
import { computeMargins, ENGINE_VERSION, parseModelText } from '../src/lib/margins/index';
import {
	generateLoop,
	logSpace,
	toLoopModel,
	toMeasuredModel,
	type GeneratedLoop
} from './lib/loop-generator';
import { octaveMargins } from './lib/octave';

const SEED = 90_000;
const PER_DOMAIN = 60;
const OCTAVE_REPEATS = 30;

const median = (xs: number[]) => {
	const s = [...xs].sort((a, b) => a - b);
	return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
};

/** Median µs of one call, after a warm-up, over at least 50 calls or 20 ms. */
function timeMicros(fn: () => unknown): number {
	for (let i = 0; i < 20; i++) fn();
	const samples: number[] = [];
	const until = process.hrtime.bigint() + 20_000_000n;
	while (samples.length < 50 || (process.hrtime.bigint() < until && samples.length < 5000)) {
		const t0 = process.hrtime.bigint();
		fn();
		samples.push(Number(process.hrtime.bigint() - t0) / 1000);
	}
	return median(samples);
}

function parsed(model: Record<string, unknown>) {
	const r = parseModelText(JSON.stringify(model));
	if (!r.ok) throw new Error(`model refused: ${r.issue.path}: ${r.issue.message}`);
	return r.model;
}

// polynomial blocks: Octave gets exactly tf(num, den), the engine exactly the same coefficients
const loops: GeneratedLoop[] = (['continuous', 'z'] as const).flatMap((domain, d) =>
	Array.from({ length: PER_DOMAIN }, (_, i) => ({
		...generateLoop(SEED + d * 1000 + i, { domain, order: 1 + (i % 10) }),
		representation: 'polynomial' as const,
		coefficientScale: 1
	}))
);

const fmt = (x: number) =>
	Number.isFinite(x) ? x.toFixed(x < 10 ? 1 : 0).padStart(9) : '        –';
const ratio = (a: number, b: number) =>
	Number.isFinite(a / b) ? `${(a / b).toFixed(1)}×`.padStart(8) : '       –';

console.log(
	`margin engine ${ENGINE_VERSION} · Node ${process.version} · ${loops.length} rational loops (seeds ${SEED}…)`
);

const ours = loops.map((l) => {
	const model = parsed(toLoopModel(l));
	return timeMicros(() => computeMargins(model));
});
const parse = loops.map((l) => {
	const text = JSON.stringify(toLoopModel(l));
	return timeMicros(() => parseModelText(text));
});

let octave: number[] = loops.map(() => NaN);
let octaveNote: string;
try {
	const t0 = Date.now();
	const res = octaveMargins(
		loops.map((l, id) => ({ id, num: l.num, den: l.den, sampleTimeSeconds: l.sampleTimeSeconds })),
		{ repeats: OCTAVE_REPEATS }
	);
	octave = res.map((r) => (r.medianSeconds ?? NaN) * 1e6);
	octaveNote = `Octave margin(): median of ${OCTAVE_REPEATS} tic/toc calls per model inside one octave-cli run (${((Date.now() - t0) / 1000).toFixed(1)} s)`;
} catch (e) {
	octaveNote = `Octave not timed: ${(e as Error).message}`;
}

console.log(`\n${octaveNote}\nper-model median µs, then the median over the models of each row\n`);
console.log('order  domain       n   ours µs  Octave µs   faster');
for (const domain of ['continuous', 'z'] as const)
	for (let order = 1; order <= 10; order++) {
		const idx = loops
			.map((l, i) => (l.domain === domain && l.order === order ? i : -1))
			.filter((i) => i >= 0);
		const a = median(idx.map((i) => ours[i]));
		const b = median(idx.map((i) => octave[i]));
		console.log(
			`${String(order).padStart(5)}  ${domain.padEnd(10)} ${String(idx.length).padStart(3)} ${fmt(a)}  ${fmt(b)}  ${ratio(b, a)}`
		);
	}
const oursAll = median(ours);
const octaveAll = median(octave.filter(Number.isFinite));
console.log(
	`\noverall median: ours ${oursAll.toFixed(1)} µs, Octave ${octaveAll.toFixed(0)} µs, ${(octaveAll / oursAll).toFixed(1)}× faster`
);
console.log(
	`slowest model (ours): ${Math.max(...ours).toFixed(1)} µs; parse (JSON text → model) median ${median(parse).toFixed(1)} µs`
);
console.log(
	`targets: ours ≤ 100 µs → ${oursAll <= 100 ? 'met' : 'NOT met'}; ≥ 20× faster than Octave → ${octaveAll / oursAll >= 20 ? 'met' : Number.isFinite(octaveAll) ? 'NOT met' : 'not measured'}`
);

// measured and delayed loops are not something Octave's margin() takes: timed alone
const extra = Array.from({ length: 20 }, (_, i) =>
	generateLoop(SEED + 5000 + i, { domain: 'continuous', order: 1 + (i % 10) })
);
const measuredModels = extra.map((l) => {
	const f = l.targetCrossover / (2 * Math.PI);
	return toMeasuredModel(l, logSpace(f / 100, f * 100, 500));
});
const measured = measuredModels.map((m) => {
	const model = parsed(m);
	return timeMicros(() => computeMargins(model));
});
const measuredParse = measuredModels.map((m) => {
	const text = JSON.stringify(m);
	return timeMicros(() => parseModelText(text));
});
const delayed = extra.map((l) => {
	const model = parsed(toLoopModel(l, { delaySeconds: 0.3 / l.targetCrossover }));
	return timeMicros(() => computeMargins(model));
});
console.log(
	`\nmeasured loops (500 points, ${measured.length} models): median ${median(measured).toFixed(1)} µs, slowest ${Math.max(...measured).toFixed(1)} µs; parse median ${median(measuredParse).toFixed(1)} µs`
);
console.log(
	`delayed loops (${delayed.length} models): median ${median(delayed).toFixed(1)} µs, slowest ${Math.max(...delayed).toFixed(1)} µs`
);
console.log(
	`target ≤ 1 ms: measured ${median(measured) <= 1000 ? 'met' : 'NOT met'}, delayed ${median(delayed) <= 1000 ? 'met' : 'NOT met'}`
);
