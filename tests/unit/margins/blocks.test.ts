import { describe, expect, it } from 'vitest';
import type { CaseResult } from '../../../src/lib/margins/index';
import { caseOf, conv, near, nearRel, poly } from './helpers';

/** Two descriptions of the same loop must give the same figures. */
function same(a: CaseResult, b: CaseResult, tol = 1e-9) {
	expect(b.stable).toBe(a.stable);
	expect(b.gainCrossovers.length).toBe(a.gainCrossovers.length);
	expect(b.phaseCrossovers.length).toBe(a.phaseCrossovers.length);
	a.gainCrossovers.forEach((g, i) => {
		nearRel(b.gainCrossovers[i].hz, g.hz, tol, 'gain crossover');
		near(b.gainCrossovers[i].phaseMarginDeg, g.phaseMarginDeg, 1e6 * tol, 'PM');
	});
	a.phaseCrossovers.forEach((p, i) => {
		nearRel(b.phaseCrossovers[i].hz, p.hz, tol, 'phase crossover');
		near(b.phaseCrossovers[i].gainMarginDb, p.gainMarginDb, 1e6 * tol, 'GM');
	});
	nearRel(b.modulusMargin, a.modulusMargin!, 1e-6, 'modulus margin');
}

// plant 10(s + 3)/((s + 1)(s² + 2s + 5)), open loop stable
const num = [10, 30];
const den = conv([1, 1], [1, 2, 5]);
const reference = () => caseOf({ blocks: [poly(num, den)] });

describe('every rational block type describes the same loop', () => {
	it('factored: k·Π(s − zᵢ)/Π(s − pᵢ), complex roots as [re, im] pairs', () => {
		same(
			reference(),
			caseOf({
				blocks: [{ type: 'factored', zeros: [-3], poles: [-1, [-1, 2], [-1, -2]], gain: 10 }]
			})
		);
	});

	it('state-space: D = poly(eig A), N = d·D + poly(eig(A − bc)) − poly(eig A)', () => {
		// controllable canonical form of the plant
		const a = [
			[0, 1, 0],
			[0, 0, 1],
			[-5, -7, -3]
		];
		same(
			reference(),
			caseOf({
				blocks: [{ type: 'state-space', a, b: [[0], [0], [1]], c: [[30, 10, 0]], d: [[0]] }]
			})
		);
		// a biproper block: adds d = 2 in parallel
		const bi = caseOf({
			blocks: [{ type: 'state-space', a, b: [[0], [0], [1]], c: [[30, 10, 0]], d: [[2]] }]
		});
		const biRef = caseOf({ blocks: [poly([2, 6, 24, 40], den)] });
		same(biRef, bi, 1e-8);
	});

	it('state-space with a Jordan block keeps its double integrator exact', () => {
		const c = caseOf({
			blocks: [
				{
					type: 'state-space',
					a: [
						[0, 1],
						[0, 0]
					],
					b: [[0], [1]],
					c: [[1, 0]]
				},
				poly([2, 1], [0.1, 1])
			]
		});
		same(caseOf({ blocks: [poly([2, 1], conv([1, 0, 0], [0.1, 1]))] }), c);
	});

	it('pid: kp + ki/s + kd·s/(1 + Tf·s) as one block', () => {
		const pid = { type: 'pid', kp: 2, ki: 3, kd: 0.5, derivativeFilterSeconds: 0.01 };
		// (kp·s(1+Tf s) + ki(1+Tf s) + kd s²) / (s(1 + Tf s))
		const pidNum = [2 * 0.01 + 0.5, 2 + 3 * 0.01, 3];
		same(
			caseOf({ blocks: [poly(pidNum, [0.01, 1, 0]), poly(num, den)] }),
			caseOf({ blocks: [pid, poly(num, den)] })
		);
		// a P-only block has no integrator (nothing cancelled at s = 0)
		const p = caseOf({ blocks: [{ type: 'pid', kp: 2 }, poly(num, den)] });
		same(
			caseOf({
				blocks: [
					poly(
						num.map((x) => 2 * x),
						den
					)
				]
			}),
			p
		);
	});

	it('blocks multiply in series, in any order', () => {
		const split = caseOf({
			blocks: [poly([1], [1, 2, 5]), { type: 'factored', zeros: [-3], poles: [-1], gain: 10 }]
		});
		const swapped = caseOf({
			blocks: [{ type: 'factored', zeros: [-3], poles: [-1], gain: 10 }, poly([1], [1, 2, 5])]
		});
		same(reference(), split);
		same(split, swapped);
	});

	it('z-domain blocks: polynomial and factored agree', () => {
		const zPoly = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [poly([0.2, 0.1], conv([1, -0.9], [1, -0.5]))]
		});
		const zFac = caseOf({
			sampleTimeSeconds: 0.01,
			blocks: [{ type: 'factored', zeros: [-0.5], poles: [0.9, 0.5], gain: 0.2 }]
		});
		same(zPoly, zFac);
	});

	it('zero-order hold of a first-order block is (1 − e^{−aT})/a / (z − e^{−aT}) [form]', () => {
		const [a, T] = [3, 0.05];
		const e = Math.exp(-a * T);
		const held = caseOf({
			sampleTimeSeconds: T,
			blocks: [poly([12], [1, a], { domain: 's', discretize: 'zoh' })]
		});
		const exact = caseOf({
			sampleTimeSeconds: T,
			blocks: [{ type: 'factored', poles: [e], gain: (12 * (1 - e)) / a }]
		});
		same(exact, held, 1e-10);
	});

	it('zero-order hold of factored, polynomial and state-space forms agree', () => {
		const T = 0.1;
		const held = (block: Record<string, unknown>) =>
			caseOf({ sampleTimeSeconds: T, blocks: [{ ...block, domain: 's', discretize: 'zoh' }] });
		const ref = held(poly(num, den));
		same(
			ref,
			held({ type: 'factored', zeros: [-3], poles: [-1, [-1, 2], [-1, -2]], gain: 10 }),
			1e-8
		);
		same(
			ref,
			held({
				type: 'state-space',
				a: [
					[0, 1, 0],
					[0, 0, 1],
					[-5, -7, -3]
				],
				b: [[0], [0], [1]],
				c: [[30, 10, 0]]
			}),
			1e-8
		);
	});

	it('measured blocks combine with rational ones (loop = measured plant × controller)', () => {
		const plantNum = [10, 30];
		const hz = Array.from({ length: 400 }, (_, i) => 0.01 * 10 ** ((5 * i) / 399));
		const L = (f: number) => {
			const w = 2 * Math.PI * f;
			const val = (p: number[]) =>
				p.reduce<[number, number]>(([re, im], c) => [-im * w + c, re * w], [0, 0]);
			const [nr, ni] = val(plantNum);
			const [dr, di] = val(den);
			const d2 = dr * dr + di * di;
			return [(nr * dr + ni * di) / d2, (ni * dr - nr * di) / d2];
		};
		const measured = {
			type: 'measured',
			hz,
			magnitudeDb: hz.map((f) => 20 * Math.log10(Math.hypot(...L(f)))),
			phaseDeg: hz.map((f) => (Math.atan2(L(f)[1], L(f)[0]) * 180) / Math.PI),
			openLoopUnstablePoles: 0
		};
		const controller = { type: 'pid', kp: 0.5, ki: 1 };
		const m = caseOf({ blocks: [measured, controller] });
		const r = caseOf({ blocks: [poly(plantNum, den), controller] });
		expect(m.measuredOnly).toBe(true);
		expect(m.stable).toBe(r.stable);
		nearRel(m.phaseMarginHz, r.phaseMarginHz!, 1e-3);
		near(m.phaseMarginDeg, r.phaseMarginDeg!, 0.05);
	});
});
