/**
 * The margins CLI as a user runs it: `npx tsx scripts/margins.ts FILE...` on the model fixtures.
 */
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../../..', import.meta.url));

function run(...files: string[]) {
	const r = spawnSync('npx', ['tsx', 'scripts/margins.ts', ...files], {
		cwd: root,
		encoding: 'utf8',
		timeout: 60_000
	});
	const lines = r.stdout.split('\n').filter((l) => l.trim() !== '');
	return {
		status: r.status,
		lines: lines.map((l) => JSON.parse(l)),
		stderr: r.stderr,
		stdout: r.stdout
	};
}

const fixtures = readdirSync(new URL('../../../fixtures/models', import.meta.url)).sort();
const valid = fixtures.filter((f) => !f.startsWith('invalid-')).map((f) => `fixtures/models/${f}`);
const invalid = fixtures.filter((f) => f.startsWith('invalid-')).map((f) => `fixtures/models/${f}`);

describe('npm run margins -- FILE...', { timeout: 120_000 }, () => {
	it('writes one result line per valid file, in order, with the path as given; exit 0', () => {
		expect(valid.length).toBeGreaterThanOrEqual(6);
		const r = run(...valid);
		expect(r.status).toBe(0);
		expect(r.lines.map((l) => l.file)).toEqual(valid);
		for (const line of r.lines) {
			expect(line.format).toBe('headroom-margins/1');
			expect(line.error).toBeUndefined();
			expect(line.cases.length).toBeGreaterThan(0);
			expect(line.worstCase).toBeDefined();
		}
		const csv = r.lines.find((l) => l.file.endsWith('.csv'));
		expect(csv.cases[0].measuredOnly).toBe(true);
	});

	it('refuses each invalid fixture with a message and a path, never a stack trace; exit 1', () => {
		expect(invalid.length).toBeGreaterThanOrEqual(5);
		const r = run(valid[0], ...invalid, 'fixtures/models/does-not-exist.json');
		expect(r.status).toBe(1);
		expect(r.lines).toHaveLength(invalid.length + 2);
		expect(r.lines[0].error).toBeUndefined();
		for (const line of r.lines.slice(1)) {
			expect(Object.keys(line).sort()).toEqual(['error', 'file']);
			expect(typeof line.error.message).toBe('string');
			expect(typeof line.error.path).toBe('string');
		}
		expect(r.lines[r.lines.length - 1]).toEqual({
			file: 'fixtures/models/does-not-exist.json',
			error: { message: 'cannot read the file: no such file', path: '' }
		});
		const byName = Object.fromEntries(r.lines.map((l) => [l.file.split('/').pop(), l.error]));
		expect(byName['invalid-zero-leading-denominator.json']).toEqual({
			message: 'blocks[1].denominator: leading coefficient is zero',
			path: 'blocks[1].denominator'
		});
		expect(byName['invalid-missing-conjugate.json'].path).toBe('blocks[0].poles[0]');
		expect(byName['invalid-not-json.json'].message).toMatch(/^not JSON/);
		expect(byName['invalid-decreasing-frequencies.csv'].path).toBe('line 4');
		expect(r.stdout + r.stderr).not.toMatch(/\n\s+at /); // no stack trace anywhere
	});

	it('without files: usage on stderr, exit 2', () => {
		const r = run();
		expect(r.status).toBe(2);
		expect(r.lines).toEqual([]);
		expect(r.stderr).toMatch(/usage/);
	});
});
