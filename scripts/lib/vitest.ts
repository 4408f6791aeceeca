// One vitest run as a test stage: its output passes through untouched, and its JSON report is
// read back for the summary's pass/fail counts.
import { existsSync, readFileSync } from 'node:fs';
import type { Supervisor } from './processes';

export interface Counts {
	passed: number;
	failed: number;
	skipped: number;
}

export type Outcome = { status: 'pass' | 'fail' | 'no tests'; counts?: Counts };

interface VitestJson {
	numPassedTests?: number;
	numFailedTests?: number;
	numPendingTests?: number;
	numTodoTests?: number;
	testResults?: { status: string; assertionResults?: { status: string }[] }[];
}

function readCounts(file: string): Counts | undefined {
	if (!existsSync(file)) return undefined;
	const report = JSON.parse(readFileSync(file, 'utf8')) as VitestJson;
	// A file that fails to load runs no test, yet it is a failure: count it as one.
	const brokenFiles = (report.testResults ?? []).filter(
		(file) =>
			file.status === 'failed' && !(file.assertionResults ?? []).some((a) => a.status === 'failed')
	).length;
	return {
		passed: report.numPassedTests ?? 0,
		failed: (report.numFailedTests ?? 0) + brokenFiles,
		skipped: (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0)
	};
}

export interface VitestRun {
	root: string;
	projects: readonly string[];
	env: NodeJS.ProcessEnv;
	/** Where the JSON report goes (a temp file). */
	reportFile: string;
	/** Passed through from the command line, e.g. a file filter. */
	extraArgs: string[];
}

export async function runVitest(owner: Supervisor, run: VitestRun): Promise<Outcome> {
	const exit = await owner.run({
		name: 'vitest',
		command: 'npx',
		args: [
			'vitest',
			'run',
			...run.projects.flatMap((project) => ['--project', project]),
			// An empty project is reported as "no tests" in the summary rather than failing.
			'--passWithNoTests',
			'--reporter=default',
			'--reporter=json',
			`--outputFile.json=${run.reportFile}`,
			...run.extraArgs
		],
		cwd: run.root,
		env: run.env,
		inherit: true
	});
	const counts = readCounts(run.reportFile);
	if (exit.code !== 0) return { status: 'fail', counts };
	return { status: counts && counts.passed + counts.failed === 0 ? 'no tests' : 'pass', counts };
}

export function countText(counts?: Counts): string {
	if (!counts) return '';
	const skipped = counts.skipped ? `, ${counts.skipped} skipped` : '';
	return `${counts.passed} passed, ${counts.failed} failed${skipped}`;
}
