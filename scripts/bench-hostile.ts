// `npm run bench:hostile`: what each hostile model file costs the worker, against the limits of
// issue 8 (≤ 1 s of CPU, ≤ 100 MB of extra memory per file). Each input runs in a fresh child
// process doing what the compute job does (UTF-8 decode → parseModelText → computeMargins when
// the file is valid), so the peak resident memory it reports (maxRSS) belongs to that file
// alone, measured above the same process after loading the engine and computing a small model.
// Prints one row per input and exits 1 if any is over a limit. Figures, never test assertions.
import { fork } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { HOSTILE_INPUTS } from './lib/hostile-inputs';
import { computeMargins, MAX_MODEL_BYTES, parseModelText } from '../src/lib/margins';

const CPU_LIMIT_MS = 1000;
const MEMORY_LIMIT_MB = 100;

interface Measured {
	name: string;
	bytes: number;
	cpuMs: number;
	extraMb: number;
	outcome: string;
}

function run(bytes: Uint8Array, fileName: string): string {
	// The upload's own check (src/lib/server/revisions/upload.ts): never stored, never parsed.
	if (bytes.byteLength > MAX_MODEL_BYTES) return `refused before storing: ${bytes.byteLength} bytes is over the ${MAX_MODEL_BYTES}-byte limit`;
	let textValue: string;
	try {
		textValue = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
	} catch {
		return 'refused: not a text file (the bytes are not UTF-8)';
	}
	const parsed = parseModelText(textValue, fileName);
	if (!parsed.ok) return `refused at ${parsed.issue.path || '(file)'}: ${parsed.issue.message}`;
	computeMargins(parsed.model);
	return 'computed';
}

async function child(index: number): Promise<void> {
	const input = HOSTILE_INPUTS[index];
	// Warm-up: engine loaded and JIT-compiled on a small model, so the figures are the file's.
	run(new TextEncoder().encode(JSON.stringify({ format: 'headroom-loop-model/1', blocks: [{ type: 'polynomial', numerator: [2], denominator: [1, 3, 3, 1] }] })), 'warm.json');
	const bytes = input.bytes();
	const baseRss = process.resourceUsage().maxRSS;
	const cpu0 = process.cpuUsage();
	let outcome: string;
	try {
		outcome = run(bytes, input.fileName);
	} catch (err) {
		outcome = `THREW: ${(err as Error).message}`;
	}
	const cpu = process.cpuUsage(cpu0);
	const peakRss = process.resourceUsage().maxRSS;
	const result: Measured = {
		name: input.name,
		bytes: bytes.byteLength,
		cpuMs: (cpu.user + cpu.system) / 1000,
		extraMb: Math.max(0, peakRss - baseRss) / 1024,
		outcome
	};
	process.send!(result);
}

function measure(index: number): Promise<Measured> {
	return new Promise((resolve, reject) => {
		const c = fork(fileURLToPath(import.meta.url), ['--child', String(index)], { execArgv: ['--import', 'tsx'], stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
		let got: Measured | undefined;
		c.on('message', (m) => (got = m as Measured));
		c.on('error', reject);
		c.on('exit', (code) => (got ? resolve(got) : reject(new Error(`${HOSTILE_INPUTS[index].name}: child exited ${code}`))));
	});
}

const at = process.argv.indexOf('--child');
if (at >= 0) {
	await child(Number(process.argv[at + 1]));
} else {
	console.log(`hostile model files: CPU limit ${CPU_LIMIT_MS} ms, extra memory limit ${MEMORY_LIMIT_MB} MB per file\n`);
	console.log(`${'input'.padEnd(44)}${'size'.padStart(11)}${'CPU ms'.padStart(9)}${'× limit'.padStart(9)}${'extra MB'.padStart(10)}${'× limit'.padStart(9)}  outcome`);
	let over = 0;
	for (let i = 0; i < HOSTILE_INPUTS.length; i++) {
		const m = await measure(i);
		const cpuRatio = m.cpuMs / CPU_LIMIT_MS;
		const memRatio = m.extraMb / MEMORY_LIMIT_MB;
		const bad = cpuRatio > 1 || memRatio > 1 || m.outcome.startsWith('THREW') || m.outcome === 'computed';
		if (bad) over++;
		const size = m.bytes >= 1024 * 1024 ? `${(m.bytes / 1024 / 1024).toFixed(1)} MB` : `${(m.bytes / 1024).toFixed(1)} kB`;
		console.log(
			`${m.name.slice(0, 43).padEnd(44)}${size.padStart(11)}${m.cpuMs.toFixed(1).padStart(9)}${cpuRatio.toFixed(3).padStart(9)}${m.extraMb.toFixed(1).padStart(10)}${memRatio.toFixed(3).padStart(9)}  ${bad ? '!! ' : ''}${m.outcome.slice(0, 110)}`
		);
	}
	console.log(`\n${over === 0 ? 'every input refused within the limits' : `${over} input(s) over a limit, computed, or crashing`}`);
	process.exit(over === 0 ? 0 : 1);
}
