/**
 * `npm run bench:margins`: the margin engine against Octave's control-package `margin` on the same
 * seeded rational loops (orders 1–10, continuous and z-domain), plus measured (500-point) and
 * delayed loops timed alone, and parse time on its own. It prints; it never asserts, because
 * timings depend on the machine (targets: ≤ 100 µs per rational loop and ≥ 20× faster than Octave;
 * ≤ 1 ms for measured and delayed loops).
 *
 * Options (after `--`): `--no-octave` skips Octave; `--against REV` also times the engine as it
 * was at git revision REV, in the same process, model by model interleaved with the current one
 * (the machine's load then hits both alike), and prints both medians and their ratio;
 * `--current-first` loads the working tree's copy first (V8 runs the second-loaded copy of the
 * same code 5–10 % slower: run both ways and take the geometric mean);
 * `--rational-only` skips the measured and delayed loops; `--rounds N` repeats the A/B timing N
 * times (default 3) and takes the median per model.
 */
import { execFileSync } from 'node:child_process';
import { cpSync, mkdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { computeMargins, ENGINE_VERSION, parseModelText } from '../src/lib/margins/index';
import {
	generateLoop,
	logSpace,
	toLoopModel,
	toMeasuredModel,
	type GeneratedLoop
} from './lib/loop-generator';
import { octaveMargins } from './lib/octave';

const args = process.argv.slice(2);
const flag = (name: string) => args.includes(name);
const option = (name: string) => {
	const i = args.indexOf(name);
	return i >= 0 ? args[i + 1] : undefined;
};
const AGAINST = option('--against');
const ROUNDS = Number(option('--rounds') ?? 3);

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

/** timeMicros for two functions at once, call by call alternated, so both see the same load. */
function timePair(fa: () => unknown, fb: () => unknown): [number, number] {
	for (let i = 0; i < 20; i++) {
		fa();
		fb();
	}
	const a: number[] = [];
	const b: number[] = [];
	const until = process.hrtime.bigint() + 40_000_000n;
	while (a.length < 50 || (process.hrtime.bigint() < until && a.length < 5000)) {
		const t0 = process.hrtime.bigint();
		fa();
		const t1 = process.hrtime.bigint();
		fb();
		b.push(Number(process.hrtime.bigint() - t1) / 1000);
		a.push(Number(t1 - t0) / 1000);
	}
	return [median(a), median(b)];
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

type Engine = typeof import('../src/lib/margins/index');
/**
 * The engine at git revision `rev` (null: the working tree), copied under node_modules so its
 * imports resolve; both sides of the A/B are loaded this way, so they differ only in their code.
 */
async function engineAt(rev: string | null): Promise<Engine> {
	const root = execFileSync('git', ['rev-parse', '--show-toplevel'], { encoding: 'utf8' }).trim();
	const dir = join(
		root,
		'node_modules',
		'.bench-baseline',
		rev?.replace(/[^\w.-]/g, '_') ?? 'worktree'
	);
	rmSync(dir, { recursive: true, force: true });
	mkdirSync(join(dir, 'src/lib'), { recursive: true });
	if (rev === null)
		cpSync(join(root, 'src/lib/margins'), join(dir, 'src/lib/margins'), { recursive: true });
	else {
		const tar = execFileSync('git', ['archive', rev, 'src/lib/margins'], { cwd: root });
		execFileSync('tar', ['-x', '-C', dir], { input: tar });
	}
	return (await import(pathToFileURL(join(dir, 'src/lib/margins/index.ts')).href)) as Engine;
}

if (AGAINST) {
	// V8 runs the copy loaded second some 5–10 % slower (identical code, measured): run once with
	// --current-first and once without, and take the geometric mean of the two speed-ups
	const currentFirst = flag('--current-first');
	const current = currentFirst ? await engineAt(null) : null;
	const base = await engineAt(AGAINST);
	const now = current ?? (await engineAt(null));
	const modelsOf = (e: Engine) =>
		loops.map((l) => {
			const r = e.parseModelText(JSON.stringify(toLoopModel(l)));
			if (!r.ok) throw new Error('a model was refused');
			return r.model;
		});
	const models = modelsOf(now);
	const baseModels = modelsOf(base);
	const nowT: number[][] = loops.map(() => []);
	const then: number[][] = loops.map(() => []);
	for (let round = 0; round < ROUNDS; round++)
		for (let i = 0; i < loops.length; i++) {
			// alternate which goes first, so neither always gets the warmer cache
			const one = () => now.computeMargins(models[i]);
			const other = () => base.computeMargins(baseModels[i]);
			const [x, y] = (round + i) % 2 ? timePair(one, other) : timePair(other, one).reverse();
			nowT[i].push(x);
			then[i].push(y);
		}
	const nowM = nowT.map(median);
	const thenM = then.map(median);
	console.log(
		`\nA/B in one process (${ROUNDS} rounds, calls alternated; loaded first: ${currentFirst ? 'working tree' : AGAINST}): ${AGAINST} against the working tree`
	);
	console.log('domain       orders   then µs    now µs   speed-up');
	for (const domain of ['continuous', 'z'] as const)
		for (const [lo, hi] of [
			[1, 6],
			[7, 10]
		]) {
			const idx = loops
				.map((l, i) => (l.domain === domain && l.order >= lo && l.order <= hi ? i : -1))
				.filter((i) => i >= 0);
			const a = median(idx.map((i) => thenM[i]));
			const b = median(idx.map((i) => nowM[i]));
			console.log(
				`${domain.padEnd(10)} ${`${lo}–${hi}`.padStart(8)} ${fmt(a)} ${fmt(b)} ${ratio(a, b)}`
			);
		}
	const a = median(thenM);
	const b = median(nowM);
	console.log(
		`overall median: then ${a.toFixed(1)} µs, now ${b.toFixed(1)} µs, ${(a / b).toFixed(2)}× `
	);
	ours.splice(0, ours.length, ...nowM);
}
const parse = loops.map((l) => {
	const text = JSON.stringify(toLoopModel(l));
	return timeMicros(() => parseModelText(text));
});

let octave: number[] = loops.map(() => NaN);
let octaveNote = 'Octave not timed (--no-octave)';
if (!flag('--no-octave'))
	try {
		const t0 = Date.now();
		const res = octaveMargins(
			loops.map((l, id) => ({
				id,
				num: l.num,
				den: l.den,
				sampleTimeSeconds: l.sampleTimeSeconds
			})),
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
if (flag('--rational-only')) process.exit(0);
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
