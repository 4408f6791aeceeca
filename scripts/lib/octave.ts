/**
 * Runs Octave's control package `margin` on a batch of loops in ONE octave-cli process: starting
 * Octave costs ~0.3 s, so one process per loop would dominate both the tests and the benchmark.
 *
 * The loops go through a plain numeric data file (one loop per line, %.17g round-trips doubles)
 * read by a generated .m script, which prints one machine-readable line per loop.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export interface OctaveLoop {
	/** Echoed back, to key results. */
	id: number;
	/** Descending powers of s, or of z when `sampleTimeSeconds` is set without `c2d`. */
	num: number[];
	den: number[];
	sampleTimeSeconds?: number;
	/** Discretise the continuous num/den with Octave's own c2d before calling margin. */
	c2d?: 'zoh' | 'tustin';
}

export interface OctaveMargin {
	id: number;
	/** Octave's conventions: gain margin as a ratio (Inf when none), PM in degrees (180 when none). */
	gm: number;
	pm: number;
	/** rad/s; NaN when absent. */
	wgm: number;
	wpm: number;
	/** Octave's own discretisation (descending powers of z), for loops sent with `c2d`. */
	discretised?: { num: number[]; den: number[] };
	/** Median seconds of one margin() call over the repetitions, when timed. */
	medianSeconds?: number;
	error?: string;
}

const MISSING =
	'octave-cli was not found: the reference tests need Octave with its control package, from ' +
	"Debian's packages octave and octave-control (apt-get install -y octave octave-control; " +
	'`npm test` installs them when missing). Install it; these tests do not skip.';

// Printed by Octave 7 on exit in some builds even after a clean run; it carries no information.
const HARMLESS = /^error: ignoring const execution_exception& while preparing to exit\s*$/;

const SCRIPT = String.raw`
pkg load control;
fid = fopen(DATA_FILE, 'r');
reps = REPEATS;
while true
  line = fgetl(fid);
  if ~ischar(line), break; end
  v = sscanf(line, '%f')';
  id = v(1); T = v(2); mode = v(3); nn = v(4);
  num = v(5:4+nn); nd = v(5+nn); den = v(6+nn:5+nn+nd);
  try
    if T > 0 && mode == 0
      sys = tf(num, den, T);
    elseif T > 0
      how = {'zoh', 'tustin'};
      sys = c2d(tf(num, den), T, how{mode});
    else
      sys = tf(num, den);
    end
    [gm, pm, wg, wp] = margin(sys);
    med = NaN;
    if reps > 0
      times = zeros(1, reps);
      for r = 1:reps
        t0 = tic; [g2, p2, w2, w3] = margin(sys); times(r) = toc(t0);
      end
      med = median(times);
    end
    printf('MARGIN %d %.17g %.17g %.17g %.17g %.17g\n', id, gm, pm, wg, wp, med);
    if mode > 0
      % what Octave's own c2d produced, so a disagreement can be traced to c2d or to margin
      [dn, dd] = tfdata(sys, 'v');
      printf('TF %d %d', id, numel(dn)); printf(' %.17g', dn); printf(' %d', numel(dd)); printf(' %.17g', dd); printf('\n');
    end
  catch err
    printf('FAILED %d %s\n', id, strrep(err.message, "\n", ' '));
  end
end
fclose(fid);
printf('DONE\n');
`;

function parseNumber(text: string): number {
	if (/^-?inf$/i.test(text)) return text.startsWith('-') ? -Infinity : Infinity;
	if (/^nan$/i.test(text)) return NaN;
	return Number(text);
}

/** Throws (never skips) when octave-cli or its control package is not usable. */
export function assertOctaveAvailable(): void {
	const probe = spawnSync(
		'octave-cli',
		['--no-gui', '--quiet', '--eval', "pkg load control; printf('OK\\n')"],
		{
			encoding: 'utf8'
		}
	);
	if (probe.error) throw new Error(`${MISSING} (${probe.error.message})`);
	if (!probe.stdout.includes('OK'))
		throw new Error(
			`octave-cli runs but "pkg load control" failed: ${probe.stderr.trim()}. ${MISSING}`
		);
}

export function octaveMargins(
	loops: OctaveLoop[],
	options: { repeats?: number; timeoutMs?: number } = {}
): OctaveMargin[] {
	const dir = mkdtempSync(join(tmpdir(), 'headroom-octave-'));
	try {
		const data = join(dir, 'loops.txt');
		const fmt = (x: number) => x.toPrecision(17);
		writeFileSync(
			data,
			loops
				.map((l) => {
					const mode = l.c2d === 'zoh' ? 1 : l.c2d === 'tustin' ? 2 : 0;
					return [
						l.id,
						l.sampleTimeSeconds ?? 0,
						mode,
						l.num.length,
						...l.num,
						l.den.length,
						...l.den
					]
						.map((x) => (Number.isInteger(x) ? String(x) : fmt(x)))
						.join(' ');
				})
				.join('\n') + '\n'
		);
		const script = join(dir, 'run_margins.m');
		writeFileSync(
			script,
			SCRIPT.replace('DATA_FILE', `'${data}'`).replace('REPEATS', String(options.repeats ?? 0))
		);
		const run = spawnSync('octave-cli', ['--no-gui', '--quiet', '--no-window-system', script], {
			encoding: 'utf8',
			timeout: options.timeoutMs ?? 600_000,
			maxBuffer: 64 * 1024 * 1024
		});
		if (run.error) throw new Error(`${MISSING} (${run.error.message})`);
		const noise = run.stderr
			.split('\n')
			.filter((l) => l.trim() !== '' && !HARMLESS.test(l) && !/^warning:/.test(l));
		if (!run.stdout.includes('DONE'))
			throw new Error(
				`octave-cli did not finish the batch (status ${run.status}): ${noise.join(' | ')}`
			);
		const results = new Map<number, OctaveMargin>();
		for (const line of run.stdout.split('\n')) {
			const parts = line.trim().split(/\s+/);
			if (parts[0] === 'MARGIN') {
				const [id, gm, pm, wgm, wpm, med] = parts.slice(1).map(parseNumber);
				results.set(id, {
					id,
					gm,
					pm,
					wgm,
					wpm,
					medianSeconds: Number.isNaN(med) ? undefined : med
				});
			} else if (parts[0] === 'TF') {
				const v = parts.slice(1).map(parseNumber);
				const nn = v[1];
				const entry = results.get(v[0]);
				if (entry)
					entry.discretised = { num: v.slice(2, 2 + nn), den: v.slice(3 + nn, 3 + nn + v[2 + nn]) };
			} else if (parts[0] === 'FAILED') {
				const id = Number(parts[1]);
				results.set(id, {
					id,
					gm: NaN,
					pm: NaN,
					wgm: NaN,
					wpm: NaN,
					error: parts.slice(2).join(' ')
				});
			}
		}
		return loops.map(
			(l) =>
				results.get(l.id) ?? {
					id: l.id,
					gm: NaN,
					pm: NaN,
					wgm: NaN,
					wpm: NaN,
					error: 'no output line'
				}
		);
	} finally {
		rmSync(dir, { recursive: true, force: true });
	}
}
