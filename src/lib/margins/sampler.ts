/**
 * Points for Bode and Nyquist plots: a log grid two decades past the outermost roots and
 * crossovers (sampled loops: up to the Nyquist frequency; measured loops: their band), denser at
 * lightly damped roots, with every crossover itself included. The phase is the engine's natural
 * phase, continuous along the axis, so plots need no unwrapping of their own.
 */
import { radPerSecond, type CaseAnalysis } from './figures';
import { band, logGrid, withFeatures } from './grid';
import { buildCases, type CaseLoop } from './loop';
import { analyseCase, gainScaleOf } from './margins';
import { classifyRoots } from './response-grid';
import { LoopResponse } from './response';
import type { LoopModel } from './schema';

export interface ResponsePoint {
	hz: number;
	magnitudeDb: number;
	phaseDeg: number;
	re: number;
	im: number;
}

export interface CaseResponse {
	name: string;
	points: ResponsePoint[];
	measuredOnly: boolean;
	nyquistHz?: number;
}

const DB = 20 / Math.LN10;
const DEG = 180 / Math.PI;

export function sampleResponse(
	model: LoopModel,
	options?: { gainScale?: number; points?: number }
): CaseResponse[] {
	const count = Math.max(16, Math.min(20_000, Math.round(options?.points ?? 300)));
	const scale = gainScaleOf(options);
	const nominal = buildCases(model, 1);
	const scaled = scale === 1 ? nominal : buildCases(model, scale);
	return scaled.map((loop, i) => sampleCase(loop, nominal[i], count));
}

const crossingsOf = (a: CaseAnalysis): number[] =>
	[...a.gain, ...a.phase].map((c) => c.f).filter((f) => f > 0 && Number.isFinite(f));

/** The band follows the nominal loop, so a what-if gain slider moves the curve, not the grid. */
function sampleCase(loop: CaseLoop, nominal: CaseLoop, count: number): CaseResponse {
	const resp = new LoopResponse(loop);
	const analysis = analyseCase(loop);
	const crossings = crossingsOf(analysis);
	const bandCrossings = nominal === loop ? crossings : crossingsOf(analyseCase(nominal));
	const roots = classifyRoots(resp);
	const measured = loop.measured.length > 0;
	let lo: number;
	let hi: number;
	if (measured) {
		lo = resp.internal(Math.max(...loop.measured.map((m) => m.hz[0])));
		hi = resp.internal(Math.min(...loop.measured.map((m) => m.hz[m.hz.length - 1])));
	} else {
		const freqs = [...roots.freqs, ...bandCrossings, ...roots.interior.map((r) => r.f)];
		if (resp.delay > 0) freqs.push(1 / resp.delay);
		[lo, hi] = band(freqs, 100, resp.sampled ? 0.1 : 1);
		if (resp.sampled) {
			lo = Math.min(lo, Math.PI / 1000);
			hi = roots.high > 0 ? Math.PI * (1 - 1e-7) : Math.PI;
		}
	}
	const decades = Math.max(1e-9, Math.log10(hi / lo));
	const base = logGrid(lo, hi, count / decades);
	// a boundary root is stepped over, not evaluated on
	const avoid = roots.interior.map((r) => r.f);
	const grid = withFeatures(base, roots.features, lo, hi, crossings).filter((f) =>
		avoid.every((a) => Math.abs(f - a) > 1e-7 * a)
	);
	const points = grid.map((f) => {
		resp.at(f);
		return {
			hz: radPerSecond(analysis, f) / (2 * Math.PI),
			magnitudeDb: resp.lnMag * DB,
			phaseDeg: resp.phase * DEG,
			re: resp.re,
			im: resp.im
		};
	});
	const out: CaseResponse = { name: loop.name, points, measuredOnly: measured };
	if (loop.T !== null) out.nyquistHz = 1 / (2 * loop.T);
	return out;
}
