/**
 * `npm run --silent margins -- FILE...`: one JSON line per file on stdout, in the order given —
 * the margins result with "file", or {"file", "error": {"message", "path"}} for a file that could
 * not be read or was refused. Exit status 0 when every file was computed, 1 otherwise, 2 without
 * files. A bad file never produces a stack trace.
 */
import { readFile } from 'node:fs/promises';
import { computeMargins, parseModelText } from '../src/lib/margins/index';

type Line = Record<string, unknown>;

async function one(file: string): Promise<{ line: Line; ok: boolean }> {
	let text: string;
	try {
		text = await readFile(file, 'utf8');
	} catch (e) {
		const code = (e as NodeJS.ErrnoException).code;
		const why =
			code === 'ENOENT'
				? 'no such file'
				: code === 'EISDIR'
					? 'is a directory'
					: (code ?? 'unreadable');
		return {
			line: { file, error: { message: `cannot read the file: ${why}`, path: '' } },
			ok: false
		};
	}
	const parsed = parseModelText(text, file);
	if (!parsed.ok) return { line: { file, error: parsed.issue }, ok: false };
	try {
		return { line: { file, ...computeMargins(parsed.model) }, ok: true };
	} catch (e) {
		// an engine fault, not the file's: still one line, still no stack trace
		return {
			line: { file, error: { message: `internal error: ${(e as Error).message}`, path: '' } },
			ok: false
		};
	}
}

const files = process.argv.slice(2);
if (files.length === 0) {
	process.stderr.write('usage: npm run --silent margins -- FILE...\n');
	process.exit(2);
}
let allOk = true;
for (const file of files) {
	const { line, ok } = await one(file);
	allOk &&= ok;
	process.stdout.write(`${JSON.stringify(line)}\n`);
}
process.exitCode = allOk ? 0 : 1;
