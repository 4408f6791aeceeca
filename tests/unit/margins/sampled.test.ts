/**
 * Sampled loops where z-coefficients lose the response: poles crowded at z = 1 (fast sampling),
 * integrators and Tustin zeros written out as rounded coefficients, z-domain state space.
 */
import { describe, expect, it } from 'vitest';
import { computeMargins, sampleResponse, type CaseResult } from '../../../src/lib/margins/index';
import { buildCases } from '../../../src/lib/margins/loop';
import { loopRoots } from '../../../src/lib/margins/response';
import { caseOf, conv, model, near, nearRel, poly, TWO_PI } from './helpers';

type C = [number, number];

/** Two descriptions of one loop: the same stability, crossovers and modulus margin (rel. to tol). */
function expectSameLoop(a: CaseResult, b: CaseResult, tol: number) {
	expect(a.stable).toBe(b.stable);
	expect(a.gainCrossovers.length).toBe(b.gainCrossovers.length);
	expect(a.phaseCrossovers.length).toBe(b.phaseCrossovers.length);
	a.phaseCrossovers.forEach((p, i) => {
		nearRel(p.hz, b.phaseCrossovers[i].hz, tol);
		near(p.gainMarginDb, b.phaseCrossovers[i].gainMarginDb, 10 * tol);
	});
	nearRel(a.modulusMargin, b.modulusMargin!, tol);
}
const cmul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const cdiv = (a: C, b: C): C => {
	const d = b[0] * b[0] + b[1] * b[1];
	return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};

/**
 * The hold by partial fractions, independent of the engine's route (realisation, e^{AT}, fitted
 * numerator): G_z(z) = Σ rᵢ (e^{pᵢT} − 1) / (pᵢ (z − e^{pᵢT})) for simple poles pᵢ, written with
 * z − e^{pT} = (z − 1) − (e^{pT} − 1) so that it keeps its precision near z = 1.
 */
function heldResponse(k: number, zeros: C[], poles: C[], T: number, theta: number): C {
	const s2 = Math.sin(theta / 2);
	const w: C = [-2 * s2 * s2, Math.sin(theta)];
	let out: C = [0, 0];
	poles.forEach((p, i) => {
		let r: C = [k, 0];
		for (const z of zeros) r = cmul(r, [p[0] - z[0], p[1] - z[1]]);
		poles.forEach((q, j) => {
			if (j !== i) r = cdiv(r, [p[0] - q[0], p[1] - q[1]]);
		});
		// e^{pT} − 1 = expm1(aT)·cos bT − 2 sin²(bT/2) + j e^{aT} sin bT
		const [a, b] = [p[0] * T, p[1] * T];
		const sb = Math.sin(b / 2);
		const em1: C = [Math.expm1(a) * Math.cos(b) - 2 * sb * sb, Math.exp(a) * Math.sin(b)];
		const term = cdiv(cmul(r, em1), cmul(p, [w[0] - em1[0], w[1] - em1[1]]));
		out = [out[0] + term[0], out[1] + term[1]];
	});
	return out;
}

describe('zero-order hold far faster than the loop', () => {
	// a stiff sixth-order loop with lightly damped zeros; held at T = 1.3e-7 s its poles sit within
	// 1e-4 of z = 1, where z-coefficients keep four significant digits of the response at most
	const zeros: C[] = [
		[-42.13474255839129, 0],
		[-8.525509618878061, 250.56583942620287],
		[-8.525509618878061, -250.56583942620287],
		[-9.588521694217143, 47.47068131982135],
		[-9.588521694217143, -47.47068131982135]
	];
	const poles: C[] = [
		[-37.394759633833836, 258.6301035787761],
		[-37.394759633833836, -258.6301035787761],
		[-27.158817397750926, 480.99316010150415],
		[-27.158817397750926, -480.99316010150415],
		[-159.547069885581, 117.62212247906444],
		[-159.547069885581, -117.62212247906444]
	];
	const k = 47364.495;
	const T = 1.3264298189682384e-7;
	const root = ([re, im]: C) => (im === 0 ? re : [re, im]);
	const block = { type: 'factored', gain: k, zeros: zeros.map(root), poles: poles.map(root) };

	it('keeps the held response to 1e-9 of the partial-fraction form at every frequency', () => {
		const m = model({
			sampleTimeSeconds: T,
			blocks: [{ ...block, domain: 's', discretize: 'zoh' }]
		});
		const [c] = sampleResponse(m, { points: 120 });
		for (const p of c.points) {
			const [re, im] = heldResponse(k, zeros, poles, T, TWO_PI * p.hz * T);
			expect(Math.hypot(p.re - re, p.im - im) / Math.hypot(re, im)).toBeLessThan(1e-9);
		}
	});

	it("gives the continuous loop's margins within a fraction of a degree [CHECK-VALUES property]", () => {
		const cont = caseOf({ blocks: [block] });
		const held = caseOf({
			sampleTimeSeconds: T,
			blocks: [{ ...block, domain: 's', discretize: 'zoh' }]
		});
		expect(held.stable).toBe(cont.stable);
		expect(held.gainCrossovers.length).toBe(cont.gainCrossovers.length);
		held.gainCrossovers.forEach((g, i) => {
			nearRel(g.hz, cont.gainCrossovers[i].hz, 1e-4);
			near(g.phaseMarginDeg, cont.gainCrossovers[i].phaseMarginDeg, 0.3);
		});
		near(held.lowerGainMarginDb, cont.lowerGainMarginDb!, 0.05);
	});
});

describe('coefficients that state a structure only to rounding', () => {
	it('a z-domain integrator written as coefficients, (z − 1)(z − 0.3) = z² − 1.3z + 0.3, is still an integrator', () => {
		// 1 − 1.3 + 0.3 is −5.6e-17 in floating point, not 0
		const written = caseOf({ sampleTimeSeconds: 0.01, blocks: [poly([0.02], [1, -1.3, 0.3])] });
		const factored = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [{ type: 'factored', poles: [1, 0.3], gain: 0.02 }]
		});
		expect(written.phaseCrossovers.some((p) => p.hz === 0)).toBe(false);
		expect(written.stable).toBe(factored.stable);
		nearRel(written.phaseMarginHz, factored.phaseMarginHz!, 1e-9);
		near(written.phaseMarginDeg, factored.phaseMarginDeg!, 1e-7);
		near(written.upperGainMarginDb, factored.upperGainMarginDb!, 1e-7);
	});

	it('the Tustin zeros at z = −1 of a strictly proper block make L vanish at the Nyquist frequency', () => {
		// relative degree 2: a double zero at z = −1, which the expanded coefficients split by rounding
		const T = 0.05;
		const c = caseOf({
			sampleTimeSeconds: T,
			blocks: [poly([40], [1, 3, 2, 0], { domain: 's', discretize: 'tustin' })]
		});
		const nyquist = 1 / (2 * T);
		expect(c.phaseCrossovers.every((p) => Math.abs(p.hz - nyquist) > 1e-6 * nyquist)).toBe(true);
		const [r] = sampleResponse(
			model({
				sampleTimeSeconds: T,
				blocks: [poly([40], [1, 3, 2, 0], { domain: 's', discretize: 'tustin' })]
			})
		);
		const last = r.points[r.points.length - 1];
		expect(Math.hypot(last.re, last.im)).toBeLessThan(1e-12);
	});
});

describe('z-domain state space', () => {
	it('equals its factored form: a two-section cascade, zero at z = −0.5', () => {
		// x1⁺ = 0.9 x1 + 0.1 u; x2⁺ = x1 + 0.5 x2; y = x1 + x2
		const a = [
			[0.9, 0],
			[1, 0.5]
		];
		const ss = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [{ type: 'state-space', a, b: [[0.1], [0]], c: [[1, 1]] }]
		});
		// c(zI − A)⁻¹b = 0.1/(z − 0.9) + 0.1/((z − 0.9)(z − 0.5)) = 0.1(z − 0.5 + 1)/((z − 0.9)(z − 0.5))
		const fac = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [{ type: 'factored', zeros: [-0.5], poles: [0.9, 0.5], gain: 0.1 }]
		});
		expectSameLoop(ss, fac, 1e-10);
	});

	it('worst case and cases work the same for sampled loops', () => {
		const r = computeMargins(
			model({
				sampleTimeSeconds: 0.01,
				blocks: [{ type: 'factored', poles: [1], gain: 0.05 }],
				cases: [{ name: 'a' }, { name: 'b', gain: 4 }]
			})
		);
		expect(r.worstCase.from.upperGainMarginDb).toBe('b');
		expect(r.worstCase.delayMarginSamples).toBe(r.cases[1].delayMarginSamples);
	});

	it('poles exactly at z = 0 (a computational delay written into the coefficients) stay exact', () => {
		// 0.1(z + 0.5) / (z²(z − 0.9)(z − 0.5)): the same loop as coefficients and as roots
		const den = conv(conv([1, 0, 0], [1, -0.9]), [1, -0.5]);
		const written = { sampleTimeSeconds: 0.01, blocks: [poly([0.1, 0.05], den)] };
		const [built] = buildCases(model(written));
		const { poles } = loopRoots(built);
		const atOrigin = Array.from(poles.re).filter((x, i) => x === 0 && poles.im[i] === 0);
		expect(atOrigin.length).toBe(2);
		const a = caseOf(written);
		const b = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [{ type: 'factored', zeros: [-0.5], poles: [0, 0, 0.9, 0.5], gain: 0.1 }]
		});
		expectSameLoop(a, b, 1e-12);
	});
});
