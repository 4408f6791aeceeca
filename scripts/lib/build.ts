// `node build` serves whatever vite last wrote, so rebuild when any input is newer than it.
import { existsSync, readdirSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { info } from './log';
import type { ChildSpec, Supervisor } from './processes';

const INPUTS = [
	'src',
	'static',
	'svelte.config.js',
	'vite.config.ts',
	'tailwind.config.ts',
	'package.json'
];
// adapter-node writes these last; a build that died half-way leaves one of them missing.
const OUTPUTS = ['build/index.js', 'build/handler.js'];

function newest(path: string): { mtime: number; path: string } | undefined {
	if (!existsSync(path)) return undefined;
	const stat = statSync(path);
	if (!stat.isDirectory()) return { mtime: stat.mtimeMs, path };
	let best: { mtime: number; path: string } | undefined;
	for (const entry of readdirSync(path)) {
		const found = newest(join(path, entry));
		if (found && (!best || found.mtime > best.mtime)) best = found;
	}
	return best;
}

/** Why a build is needed, or undefined when build/ is up to date. */
export function staleReason(root: string): string | undefined {
	let built = Infinity;
	for (const output of OUTPUTS) {
		const path = join(root, output);
		if (!existsSync(path)) return `${output} is missing`;
		built = Math.min(built, statSync(path).mtimeMs);
	}
	for (const input of INPUTS) {
		const found = newest(join(root, input));
		if (found && found.mtime > built)
			return `${found.path.slice(root.length + 1)} changed since the last build`;
	}
	return undefined;
}

/** `override` is a shell command (HEADROOM_BUILD_CMD) replacing `npx vite build`. */
export async function buildIfStale(
	supervisor: Supervisor,
	root: string,
	env: NodeJS.ProcessEnv,
	override?: string
): Promise<void> {
	const reason = staleReason(root);
	if (!reason) {
		info('build/ is up to date');
		return;
	}
	info(`building the app (${reason})`);
	// vite picks its mode from NODE_ENV: an inherited "test" or "development" would not give a
	// production bundle.
	const { NODE_ENV: _ignored, ...buildEnv } = env;
	const spec: ChildSpec = override
		? { name: 'build', command: override, shell: true, cwd: root, env: buildEnv }
		: { name: 'build', command: 'npx', args: ['vite', 'build'], cwd: root, env: buildEnv };
	const started = Date.now();
	await supervisor.runOrThrow({ ...spec, stopTimeoutMs: 5_000 });
	info(`build finished in ${((Date.now() - started) / 1000).toFixed(1)}s`);
}
