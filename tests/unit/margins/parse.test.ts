import { describe, expect, it } from 'vitest';
import { loopModelSchema, MAX_MODEL_BYTES, parseModelText } from '../../../src/lib/margins/index';
import { FORMAT, poly } from './helpers';

const refusal = (text: string, fileName?: string) => {
	const r = parseModelText(text, fileName);
	if (r.ok) throw new Error(`accepted: ${text.slice(0, 200)}`);
	return r.issue;
};
const refuse = (m: Record<string, unknown>) => refusal(JSON.stringify({ format: FORMAT, ...m }));
const accepts = (m: Record<string, unknown>) =>
	parseModelText(JSON.stringify({ format: FORMAT, ...m })).ok;

/** Path and message both: the message repeats the path and names the problem. */
function expectIssue(issue: { message: string; path: string }, path: string, problem: RegExp) {
	expect(issue.path).toBe(path);
	expect(issue.message).toMatch(problem);
	if (path) expect(issue.message.startsWith(`${path}: `)).toBe(true);
}

const plant = poly([1], [1, 1]);

describe('refusals named in the model format, each with its path', () => {
	it('not JSON', () => {
		expectIssue(refusal('format: headroom'), '', /not JSON/);
		expectIssue(refusal(''), '', /empty/);
		expectIssue(refusal('[1, 2]'), '', /must hold a JSON object/);
	});

	it('wrong or missing format', () => {
		expectIssue(
			refusal(JSON.stringify({ format: 'headroom-loop-model/2', blocks: [plant] })),
			'format',
			/wrong format "headroom-loop-model\/2"/
		);
		expectIssue(refusal(JSON.stringify({ blocks: [plant] })), 'format', /format is required/);
	});

	it('no blocks', () => {
		expectIssue(refuse({ blocks: [] }), 'blocks', /no blocks/);
		expectIssue(refuse({}), 'blocks', /is required/);
	});

	it('unknown block type, unknown field', () => {
		expectIssue(
			refuse({ blocks: [plant, { type: 'transfer-function' }] }),
			'blocks[1].type',
			/unknown block type "transfer-function"/
		);
		expectIssue(
			refuse({
				blocks: [{ type: 'polynomial', numerater: [1], numerator: [1], denominator: [1, 1] }]
			}),
			'blocks[0].numerater',
			/unknown field/
		);
	});

	it('NaN or infinite numbers (1e309 parses to Infinity), and non-numbers', () => {
		const text = `{"format":"${FORMAT}","blocks":[{"type":"polynomial","numerator":[1, 1e309],"denominator":[1,1,1]}]}`;
		expectIssue(refusal(text), 'blocks[0].numerator[1]', /not a finite number/);
		expectIssue(
			refuse({ blocks: [poly([1], [1, '2'] as unknown as number[])] }),
			'blocks[0].denominator[1]',
			/must be a number, got string/
		);
		expectIssue(
			refuse({ sampleTimeSeconds: null, blocks: [plant] }),
			'sampleTimeSeconds',
			/must be a number/
		);
	});

	it('zero or empty denominator, leading zero, zero numerator', () => {
		expectIssue(
			refuse({ blocks: [plant, poly([2], [0, 1, 3])] }),
			'blocks[1].denominator',
			/leading coefficient is zero/
		);
		expectIssue(
			refuse({ blocks: [poly([1], [0, 0])] }),
			'blocks[0].denominator',
			/denominator is zero/
		);
		expectIssue(
			refuse({ blocks: [poly([1], [])] }),
			'blocks[0].denominator',
			/denominator is empty/
		);
		expectIssue(
			refuse({ blocks: [poly([0, 0], [1, 1])] }),
			'blocks[0].numerator',
			/numerator is zero/
		);
		expectIssue(
			refuse({ blocks: [poly([], [1, 1])] }),
			'blocks[0].numerator',
			/numerator is empty/
		);
		// a numerator padded with leading zeros is ordinary
		expect(accepts({ blocks: [poly([0, 0, 1], [1, 2, 1])] })).toBe(true);
	});

	it('improper loop, counted over all blocks of the case (measured blocks excepted)', () => {
		expectIssue(
			refuse({ blocks: [poly([1, 2, 3], [1, 1])] }),
			'blocks',
			/improper loop: .*2 zeros and 1 pole/
		);
		// each block improper or proper on its own does not matter, the product does
		expect(accepts({ blocks: [poly([1, 2, 3], [1, 1]), poly([1], [1, 2, 1])] })).toBe(true);
		const idealPid = { type: 'pid', kp: 1, kd: 0.1 };
		expectIssue(refuse({ blocks: [idealPid] }), 'blocks', /improper loop/);
		expect(accepts({ blocks: [idealPid, poly([1], [1, 2, 1])] })).toBe(true);
		expectIssue(
			refuse({ blocks: [plant], cases: [{ name: 'a' }, { name: 'b', blocks: [idealPid] }] }),
			'cases[1].blocks',
			/improper loop/
		);
		const measured = {
			type: 'measured',
			hz: [1, 10],
			magnitudeDb: [0, -20],
			phaseDeg: [-90, -90],
			openLoopUnstablePoles: 0
		};
		expect(accepts({ blocks: [measured, idealPid] })).toBe(true);
	});

	it('state-space dimensions that do not fit', () => {
		const ss = (a: number[][], b: number[][], c: number[][], d?: number[][]) => ({
			blocks: [{ type: 'state-space', a, b, c, ...(d ? { d } : {}) }]
		});
		expectIssue(
			refuse(ss([[0, 1], [2]], [[0], [1]], [[1, 0]])),
			'blocks[0].a[1]',
			/a must be square/
		);
		expectIssue(
			refuse(
				ss(
					[
						[0, 1],
						[2, 3]
					],
					[[0, 1]],
					[[1, 0]]
				)
			),
			'blocks[0].b',
			/must be 2×1.*got 1×2/
		);
		expectIssue(
			refuse(
				ss(
					[
						[0, 1],
						[2, 3]
					],
					[[0], [1]],
					[[1], [0]]
				)
			),
			'blocks[0].c',
			/must be 1×2.*got 2×1/
		);
		expectIssue(
			refuse(
				ss(
					[
						[0, 1],
						[2, 3]
					],
					[[0], [1]],
					[[1, 0]],
					[[1, 2]]
				)
			),
			'blocks[0].d',
			/must be 1×1/
		);
		expectIssue(refuse(ss([], [], [[]])), 'blocks[0].a', /at least one state/);
		expect(accepts(ss([[-1]], [[1]], [[2]]))).toBe(true); // d defaults to 0
	});

	it('a complex root without its conjugate', () => {
		expectIssue(
			refuse({ blocks: [{ type: 'factored', poles: [[-1, 2], -3], gain: 5 }] }),
			'blocks[0].poles[0]',
			/complex root \[-1, 2\] has no conjugate \[-1, -2\]/
		);
		expectIssue(
			refuse({ blocks: [{ type: 'factored', zeros: [[-1, -2]], poles: [-1, -3] }] }),
			'blocks[0].zeros[0]',
			/no conjugate/
		);
		// multiplicity counts: two upper roots need two lower ones
		expectIssue(
			refuse({
				blocks: [
					{
						type: 'factored',
						poles: [
							[-1, 2],
							[-1, 2],
							[-1, -2]
						]
					}
				]
			}),
			'blocks[0].poles[1]',
			/no conjugate/
		);
		expect(
			accepts({ blocks: [{ type: 'factored', poles: [[-1, 2], -3, [-1, -2], [-4, 0]] }] })
		).toBe(true);
	});

	it('non-increasing or mismatched measured arrays', () => {
		const m = (hz: number[], mag: number[], ph: number[], extra: Record<string, unknown> = {}) => ({
			blocks: [
				{ type: 'measured', hz, magnitudeDb: mag, phaseDeg: ph, openLoopUnstablePoles: 0, ...extra }
			]
		});
		expectIssue(
			refuse(m([1, 2, 2], [0, 0, 0], [0, 0, 0])),
			'blocks[0].hz[2]',
			/strictly increasing/
		);
		expectIssue(
			refuse(m([1, 2, 3], [0, 0], [0, 0, 0])),
			'blocks[0].magnitudeDb',
			/has 2 points but hz has 3/
		);
		expectIssue(
			refuse(m([1, 2, 3], [0, 0, 0], [0, 0, 0, 0])),
			'blocks[0].phaseDeg',
			/has 4 points but hz has 3/
		);
		expectIssue(refuse(m([0, 2], [0, 0], [0, 0])), 'blocks[0].hz[0]', /must be > 0/);
		expectIssue(refuse(m([1], [0], [0])), 'blocks[0].hz', /at least 2 points/);
		const noCount = {
			blocks: [{ type: 'measured', hz: [1, 2], magnitudeDb: [0, 0], phaseDeg: [0, 0] }]
		};
		expectIssue(refuse(noCount), 'blocks[0].openLoopUnstablePoles', /is required/);
		expectIssue(
			refuse(m([1, 2], [0, 0], [0, 0], { openLoopUnstablePoles: 1.5 })),
			'blocks[0].openLoopUnstablePoles',
			/whole number/
		);
		expectIssue(
			refuse({ sampleTimeSeconds: 0.01, ...m([1, 60], [0, 0], [0, 0]) }),
			'blocks[0].hz[1]',
			/above the Nyquist frequency/
		);
		const two = {
			blocks: [
				{
					type: 'measured',
					hz: [1, 2],
					magnitudeDb: [0, 0],
					phaseDeg: [0, 0],
					openLoopUnstablePoles: 0
				},
				{
					type: 'measured',
					hz: [3, 4],
					magnitudeDb: [0, 0],
					phaseDeg: [0, 0],
					openLoopUnstablePoles: 0
				}
			]
		};
		expectIssue(refuse(two), 'blocks', /share no frequency range/);
	});

	it('non-positive sample time, negative delay', () => {
		expectIssue(
			refuse({ sampleTimeSeconds: 0, blocks: [plant] }),
			'sampleTimeSeconds',
			/must be > 0/
		);
		expectIssue(
			refuse({ sampleTimeSeconds: -1e-3, blocks: [plant] }),
			'sampleTimeSeconds',
			/must be > 0/
		);
		expectIssue(
			refuse({ delaySeconds: -0.1, blocks: [plant] }),
			'delaySeconds',
			/cannot be negative/
		);
		expectIssue(
			refuse({ blocks: [plant], cases: [{ name: 'x', delaySeconds: -1 }] }),
			'cases[0].delaySeconds',
			/cannot be negative/
		);
	});

	it('a fractional-sample delay in a sampled loop (whole samples within rounding pass)', () => {
		const z = { type: 'factored', poles: [0.9], gain: 0.1 };
		expectIssue(
			refuse({ sampleTimeSeconds: 1e-3, delaySeconds: 1.5e-3, blocks: [z] }),
			'delaySeconds',
			/1\.50000 samples.*whole number of samples/
		);
		expectIssue(
			refuse({
				sampleTimeSeconds: 1e-3,
				blocks: [z],
				cases: [{ name: 'late', delaySeconds: 2.0001e-3 }]
			}),
			'cases[0].delaySeconds',
			/whole number/
		);
		// 0.003 / 0.001 is 2.9999999999999996 in floating point: still three samples
		expect(accepts({ sampleTimeSeconds: 0.001, delaySeconds: 0.003, blocks: [z] })).toBe(true);
	});

	it('duplicate case names; empty case list; non-positive case gain', () => {
		expectIssue(
			refuse({ blocks: [plant], cases: [{ name: 'hot' }, { name: 'hot' }] }),
			'cases[1].name',
			/duplicate case name "hot" \(also cases\[0\]\)/
		);
		expectIssue(refuse({ blocks: [plant], cases: [] }), 'cases', /cases is empty/);
		expectIssue(
			refuse({ blocks: [plant], cases: [{ name: 'x', gain: 0 }] }),
			'cases[0].gain',
			/gain must be > 0/
		);
		expectIssue(
			refuse({ blocks: [plant], cases: [{ name: '' }] }),
			'cases[0].name',
			/cannot be empty/
		);
	});

	it('domains: pid in a sampled loop needs discretize; discretize needs a sampled loop', () => {
		expectIssue(
			refuse({ sampleTimeSeconds: 1e-3, blocks: [{ type: 'pid', kp: 1, ki: 2 }] }),
			'blocks[0]',
			/pid block is continuous/
		);
		expectIssue(
			refuse({ blocks: [poly([1], [1, 1], { domain: 's', discretize: 'zoh' })] }),
			'blocks[0].discretize',
			/only in a sampled loop/
		);
		expectIssue(
			refuse({ blocks: [poly([1], [1, 0.5], { domain: 'z' })] }),
			'blocks[0].domain',
			/needs a sampled loop/
		);
		expectIssue(
			refuse({ sampleTimeSeconds: 1e-3, blocks: [poly([1], [1, 1], { domain: 's' })] }),
			'blocks[0].discretize',
			/needs "discretize"/
		);
		expectIssue(
			refuse({ sampleTimeSeconds: 1e-3, blocks: [poly([1], [1, 1], { discretize: 'tustin' })] }),
			'blocks[0].domain',
			/add "domain": "s"/
		);
		expectIssue(
			refuse({
				sampleTimeSeconds: 1e-3,
				blocks: [poly([1], [1, 1], { domain: 's', discretize: 'foh' })]
			}),
			'blocks[0].discretize',
			/"zoh" or "tustin"/
		);
		expectIssue(
			refuse({
				sampleTimeSeconds: 1e-3,
				blocks: [poly([1, 0], [1], { domain: 's', discretize: 'zoh' })]
			}),
			'blocks[0]',
			/zero-order hold needs a proper block/
		);
		expect(
			accepts({
				sampleTimeSeconds: 1e-3,
				blocks: [{ type: 'pid', kp: 1, kd: 0.01, domain: 's', discretize: 'tustin' }]
			})
		).toBe(true);
	});

	it('degenerate blocks: zero gains, negative filter time, overflowing hold', () => {
		expectIssue(refuse({ blocks: [{ type: 'pid' }] }), 'blocks[0]', /all gains are zero/);
		expectIssue(
			refuse({ blocks: [{ type: 'pid', kp: 1, kd: 1, derivativeFilterSeconds: -1 }] }),
			'blocks[0].derivativeFilterSeconds',
			/must be ≥ 0/
		);
		expectIssue(
			refuse({ blocks: [{ type: 'factored', poles: [-1], gain: 0 }] }),
			'blocks[0].gain',
			/gain is zero/
		);
		expectIssue(
			refuse({
				sampleTimeSeconds: 1,
				blocks: [poly([1], [1, -1000], { domain: 's', discretize: 'zoh' })]
			}),
			'blocks[0]',
			/overflows/
		);
	});
});

describe('size limits and hostile input', () => {
	// How long these refusals take is printed by `npm run bench:hostile`, not asserted here.
	it('a file over the size limit, counted in UTF-8 bytes', () => {
		const body = JSON.stringify({ format: FORMAT, title: 'x', blocks: [plant] });
		const pad = ' '.repeat(MAX_MODEL_BYTES - body.length + 1);
		expectIssue(refusal(body + pad), '', /size limit of 5242880 bytes/);
		expect(parseModelText(body + pad.slice(1)).ok).toBe(true);
		// 2 bytes per "é": under the limit in characters, over it in bytes
		const wide = JSON.stringify({
			format: FORMAT,
			title: 'é'.repeat(Math.ceil(MAX_MODEL_BYTES / 2)),
			blocks: [plant]
		});
		expect(wide.length).toBeLessThan(MAX_MODEL_BYTES);
		expectIssue(refusal(wide), '', /size limit/);
	});

	it('deep nesting is refused before JSON.parse', () => {
		const deep = '['.repeat(2_000_000) + ']'.repeat(2_000_000);
		expectIssue(refusal(deep), '', /nested deeper than 32 levels/);
	});

	it('10⁶-element arrays and too many blocks, cases, states or roots: clear caps', () => {
		const million = new Array<number>(1_000_000).fill(1);
		const huge = JSON.stringify({
			format: FORMAT,
			blocks: [{ type: 'polynomial', numerator: million, denominator: [1, 1] }]
		});
		expectIssue(refusal(huge), 'blocks[0].numerator', /more than 61 coefficients/);
		const hz = Array.from({ length: 100_001 }, (_, i) => i + 1);
		expectIssue(
			refuse({
				blocks: [{ type: 'measured', hz, magnitudeDb: hz, phaseDeg: hz, openLoopUnstablePoles: 0 }]
			}),
			'blocks[0].hz',
			/more than 100000 points/
		);
		expectIssue(refuse({ blocks: new Array(65).fill(plant) }), 'blocks', /more than 64 blocks/);
		expectIssue(
			refuse({
				blocks: [plant],
				cases: Array.from({ length: 257 }, (_, i) => ({ name: `c${i}` }))
			}),
			'cases',
			/more than 256 cases/
		);
		const a = Array.from({ length: 61 }, () => new Array<number>(61).fill(0));
		expectIssue(
			refuse({ blocks: [{ type: 'state-space', a, b: a, c: a }] }),
			'blocks[0].a',
			/state limit 60/
		);
		expectIssue(
			refuse({ blocks: [{ type: 'factored', poles: new Array(61).fill(-1) }] }),
			'blocks[0].poles',
			/more than 60 roots/
		);
		const order50 = poly([1], [1, ...new Array<number>(50).fill(1)]);
		expectIssue(
			refuse({ blocks: [order50, order50, order50] }),
			'blocks',
			/loop order 150 exceeds the limit of 120/
		);
	});

	it('never throws, whatever the text', () => {
		let seed = 7;
		const rnd = () => (seed = (seed * 16807) % 2147483647) / 2147483647;
		const pieces = [
			'{',
			'}',
			'[',
			']',
			'"format"',
			`"${FORMAT}"`,
			':',
			',',
			'"blocks"',
			'"type"',
			'"pid"',
			'1e999',
			'-0',
			'null',
			'true',
			'"a"',
			'\\',
			'"',
			' '
		];
		for (let i = 0; i < 2000; i++) {
			const text = Array.from(
				{ length: 1 + Math.floor(rnd() * 40) },
				() => pieces[Math.floor(rnd() * pieces.length)]
			).join('');
			expect(() => parseModelText(text)).not.toThrow();
		}
		expect(() => parseModelText(undefined as unknown as string)).not.toThrow();
	});

	it('the schema alone refuses what the parser refuses', () => {
		const r = loopModelSchema.safeParse({
			format: FORMAT,
			blocks: [{ type: 'factored', poles: [[-1, 2]] }]
		});
		expect(r.success).toBe(false);
		expect(r.error?.issues[0].message).toMatch(/no conjugate/);
	});
});

describe('CSV measured responses', () => {
	const csv = (rows: string[]) => ['hz,magnitude_db,phase_deg', ...rows].join('\n');

	it('is recognised by its header or its .csv name, BOM and CRLF tolerated', () => {
		const text = csv(['10,20,-90', '100,0,-120', '1000,-20,-170']);
		const r = parseModelText(text);
		expect(r.ok).toBe(true);
		if (r.ok) {
			expect(r.model.blocks[0]).toMatchObject({
				type: 'measured',
				hz: [10, 100, 1000],
				openLoopUnstablePoles: 0
			});
			expect(r.model.sampleTimeSeconds).toBeUndefined();
		}
		expect(parseModelText(`\ufeff${text.replace(/\n/g, '\r\n')}`, 'plant.csv').ok).toBe(true);
		expect(parseModelText(' HZ, Magnitude_dB, Phase_deg\n1,0,0\n2,0,0\n').ok).toBe(true);
	});

	it('refusals name the line', () => {
		expectIssue(
			refusal('frequency,gain\n1,2', 'x.csv'),
			'line 1',
			/expected the header hz,magnitude_db,phase_deg/
		);
		expectIssue(refusal(csv(['1,0,0', '2,abc,0'])), 'line 3', /magnitude_db "abc" is not a number/);
		expectIssue(refusal(csv(['1,0,0', '2,0'])), 'line 3', /expected 3 values/);
		expectIssue(refusal(csv(['1,0,0', '2,1e309,0'])), 'line 3', /not a finite number/);
		expectIssue(refusal(csv(['10,0,0', '20,0,0', '15,0,0'])), 'line 4', /strictly increasing/);
		expectIssue(refusal(csv(['0,0,0', '1,0,0'])), 'line 2', /hz must be > 0/);
		expectIssue(refusal(csv(['1,0,0'])), '', /at least 2 points/);
		expectIssue(refusal('', 'empty.csv'), '', /CSV file is empty/);
	});
});
