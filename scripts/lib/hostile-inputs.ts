/**
 * Hostile and broken model files: every refusal MODEL-FORMAT.md lists, plus what a careless or
 * malicious uploader sends (truncated, empty, binary, deeply nested, huge arrays, 1e309). Shared
 * by the trust suite (tests/integration/trust/hostile-uploads.test.ts, through the real upload
 * path) and `npm run bench:hostile` (CPU time and memory of each, in process).
 *
 * `path` and `message` are what the refusal must say: where in the file, and what is wrong.
 */
import { MAX_MODEL_BYTES } from '../../src/lib/margins/limits';

export interface HostileInput {
	name: string;
	fileName: string;
	bytes: () => Uint8Array;
	/** Expected refusal: the JSON path ('' = the whole file) and words of the message. */
	path: string;
	message: RegExp;
	/** Refused by the upload itself (HTTP status), before anything is stored. */
	refusedBeforeStoring?: number;
}

const FORMAT = 'headroom-loop-model/1';
const text = (s: string) => () => new TextEncoder().encode(s);
const json = (v: unknown) => text(JSON.stringify(v));
const poly = (numerator: unknown, denominator: unknown) => ({ type: 'polynomial', numerator, denominator });
const model = (extra: Record<string, unknown>) => json({ format: FORMAT, blocks: [poly([1], [1, 2, 1])], ...extra });
const valid = JSON.stringify({ format: FORMAT, title: 'truncated rig file', blocks: [poly([4, 1], [1, 6, 11, 6])], cases: [{ name: 'cold', gain: 0.8 }] });

/** A pseudo-random byte string that is not UTF-8 (fixed seed: the same bytes every run). */
function garbage(n: number): Uint8Array {
	const out = new Uint8Array(n);
	let x = 0x2545f491;
	for (let i = 0; i < n; i++) {
		x ^= x << 13;
		x ^= x >>> 17;
		x ^= x << 5;
		out[i] = x & 0xff;
	}
	out[0] = 0xff; // never valid UTF-8
	return out;
}

const million = (v: number) => Array.from({ length: 1_000_000 }, (_, i) => v + i * 1e-9);
/** 10^6 small numbers (about 2 MB of JSON): under the size limit, so the parser meets them. */
const millionOnes = () => new Array<number>(1_000_000).fill(1);

export const HOSTILE_INPUTS: HostileInput[] = [
	{ name: 'not JSON', fileName: 'broken.json', bytes: text('{"format": "headroom-loop-model/1", "blocks": [}'), path: '', message: /not JSON/i },
	{ name: 'wrong format', fileName: 'v2.json', bytes: json({ format: 'headroom-loop-model/2', blocks: [poly([1], [1, 1])] }), path: 'format', message: /headroom-loop-model\/1/ },
	{ name: 'no blocks', fileName: 'empty-blocks.json', bytes: json({ format: FORMAT, blocks: [] }), path: 'blocks', message: /block/i },
	{ name: 'unknown block type', fileName: 'magic.json', bytes: json({ format: FORMAT, blocks: [{ type: 'magic', gain: 2 }] }), path: 'blocks[0]', message: /type|magic/i },
	{ name: 'NaN literal', fileName: 'nan.json', bytes: text(`{"format":"${FORMAT}","blocks":[{"type":"polynomial","numerator":[NaN],"denominator":[1,1]}]}`), path: '', message: /not JSON/i },
	{ name: 'number 1e309 (infinite)', fileName: 'inf.json', bytes: text(`{"format":"${FORMAT}","blocks":[{"type":"polynomial","numerator":[1e309],"denominator":[1,1]}]}`), path: 'blocks[0].numerator[0]', message: /finite|infinit/i },
	{ name: 'leading zero in the denominator', fileName: 'lead0.json', bytes: json({ format: FORMAT, blocks: [poly([1], [0, 1])] }), path: 'blocks[0].denominator', message: /leading coefficient/i },
	{ name: 'empty denominator', fileName: 'den-empty.json', bytes: json({ format: FORMAT, blocks: [poly([1], [])] }), path: 'blocks[0].denominator', message: /empty|at least|zero/i },
	{ name: 'zero denominator', fileName: 'den-zero.json', bytes: json({ format: FORMAT, blocks: [poly([1], [0])] }), path: 'blocks[0].denominator', message: /zero/i },
	{ name: 'improper loop', fileName: 'improper.json', bytes: json({ format: FORMAT, blocks: [poly([1, 2, 3], [1, 1])] }), path: 'blocks', message: /improper|zeros than poles/i },
	{
		name: 'state-space dimensions that do not fit',
		fileName: 'ss.json',
		bytes: json({ format: FORMAT, blocks: [{ type: 'state-space', a: [[0, 1], [-2, -3]], b: [[0], [1], [2]], c: [[1, 0]], d: [[0]] }] }),
		path: 'blocks[0].b',
		message: /must be \d+×\d+|dimension/i
	},
	{ name: 'complex root without its conjugate', fileName: 'conj.json', bytes: json({ format: FORMAT, blocks: [{ type: 'factored', zeros: [], poles: [[-1, 2]], gain: 1 }] }), path: 'blocks[0].poles', message: /conjugate/i },
	{
		name: 'measured frequencies not increasing',
		fileName: 'measured-order.json',
		bytes: json({ format: FORMAT, blocks: [{ type: 'measured', hz: [1, 3, 2], magnitudeDb: [0, -3, -6], phaseDeg: [-90, -120, -150], openLoopUnstablePoles: 0 }] }),
		path: 'blocks[0].hz',
		message: /increasing/i
	},
	{
		name: 'measured arrays of different lengths',
		fileName: 'measured-len.json',
		bytes: json({ format: FORMAT, blocks: [{ type: 'measured', hz: [1, 2, 3], magnitudeDb: [0, -3], phaseDeg: [-90, -120, -150], openLoopUnstablePoles: 0 }] }),
		path: 'blocks[0].magnitudeDb',
		message: /length|same|points|match/i
	},
	{ name: 'zero sample time', fileName: 'ts0.json', bytes: model({ sampleTimeSeconds: 0 }), path: 'sampleTimeSeconds', message: /positive|> ?0|greater/i },
	{ name: 'negative sample time', fileName: 'ts-neg.json', bytes: model({ sampleTimeSeconds: -0.001 }), path: 'sampleTimeSeconds', message: /positive|> ?0|greater/i },
	{ name: 'negative delay', fileName: 'delay-neg.json', bytes: model({ delaySeconds: -0.1 }), path: 'delaySeconds', message: /negative|>= ?0|at least/i },
	{ name: 'fractional-sample delay in a sampled loop', fileName: 'delay-frac.json', bytes: model({ sampleTimeSeconds: 0.001, delaySeconds: 0.0015 }), path: 'delaySeconds', message: /whole number of samples/i },
	{ name: 'duplicate case names', fileName: 'cases.json', bytes: model({ cases: [{ name: 'hot' }, { name: 'hot' }] }), path: 'cases[1].name', message: /duplicate|unique|twice/i },
	{ name: 'truncated file', fileName: 'truncated.json', bytes: text(valid.slice(0, Math.floor(valid.length * 0.6))), path: '', message: /not JSON/i },
	{ name: 'empty (0-byte) file', fileName: 'empty.json', bytes: () => new Uint8Array(0), path: '', message: /empty/i },
	{ name: 'binary garbage (64 kB)', fileName: 'garbage.bin', bytes: () => garbage(64 * 1024), path: '', message: /not a text file|UTF-8/i },
	{ name: 'deeply nested JSON (100 000 levels)', fileName: 'nested.json', bytes: text('['.repeat(100_000) + ']'.repeat(100_000)), path: '', message: /nested deeper/i },
	{
		name: 'deeply nested inside a model',
		fileName: 'nested-model.json',
		bytes: text(`{"format":"${FORMAT}","blocks":[${'['.repeat(5000)}${']'.repeat(5000)}]}`),
		path: '',
		message: /nested deeper/i
	},
	{ name: 'numerator of 10^6 coefficients', fileName: 'million-coeffs.json', bytes: json({ format: FORMAT, blocks: [poly(millionOnes(), [1, 1])] }), path: 'blocks[0].numerator', message: /degree|at most|too (long|many)|improper/i },
	{
		name: 'measured magnitudes: 10^6 values for 3 frequencies',
		fileName: 'million-mags.json',
		bytes: json({ format: FORMAT, blocks: [{ type: 'measured', hz: [1, 2, 3], magnitudeDb: millionOnes(), phaseDeg: [-90, -100, -110], openLoopUnstablePoles: 0 }] }),
		path: 'blocks[0].magnitudeDb',
		message: /points|at most|too many/i
	},
	{ name: '10^6 operating cases', fileName: 'million-cases.json', bytes: text(`{"format":"${FORMAT}","blocks":[{"type":"polynomial","numerator":[1],"denominator":[1,1]}],"cases":[${new Array(1_000_000).fill('{}').join(',')}]}`), path: 'cases', message: /at most|too many|cases/i },
	{
		name: 'measured response of 10^6 points (40 MB)',
		fileName: 'million-points.json',
		bytes: json({ format: FORMAT, blocks: [{ type: 'measured', hz: million(1), magnitudeDb: million(0), phaseDeg: million(-90), openLoopUnstablePoles: 0 }] }),
		path: '',
		message: /limit/i,
		refusedBeforeStoring: 413
	},
	{ name: 'CSV with a non-numeric row', fileName: 'bode.csv', bytes: text('hz,magnitude_db,phase_deg\n1,0,-90\n2,abc,-100\n'), path: 'line 3', message: /number|numeric/i },
	{
		name: '50 MB file',
		fileName: 'huge.json',
		bytes: () => new Uint8Array(50 * 1024 * 1024).fill(0x20),
		path: '',
		message: /size limit|limit/i,
		refusedBeforeStoring: 413
	},
	{
		name: 'just over the 5 MB limit',
		fileName: 'over-limit.json',
		bytes: () => {
			const b = new TextEncoder().encode(`{"format":"${FORMAT}","title":"${'x'.repeat(MAX_MODEL_BYTES)}","blocks":[]}`);
			return b;
		},
		path: '',
		message: /limit/i,
		refusedBeforeStoring: 413
	}
];
