/**
 * parseModelText: file text (JSON, or the measured-response CSV) to a validated model or one
 * refusal. It never throws, and it stays fast on hostile input: the size is checked before
 * anything is parsed and nesting before JSON.parse, and the schema caps every array.
 */
import { csvToModel, looksLikeCsv } from './csv';
import { formatPath, issue } from './issues';
import { MAX_MODEL_BYTES, MAX_NESTING } from './limits';
import { loopModelSchema, MODEL_FORMAT, type LoopModel } from './schema';
import type { ModelIssue } from './types';

export type ParseOutcome = { ok: true; model: LoopModel } | { ok: false; issue: ModelIssue };

const refuse = (path: string, problem: string): ParseOutcome => ({
	ok: false,
	issue: issue(path, problem)
});

/** UTF-8 length of a string, counting no further than `limit + 1`. */
export function utf8Length(text: string, limit = Infinity): number {
	let n = 0;
	for (let i = 0; i < text.length && n <= limit; i++) {
		const c = text.charCodeAt(i);
		if (c < 0x80) n += 1;
		else if (c < 0x800) n += 2;
		else if (
			c >= 0xd800 &&
			c <= 0xdbff &&
			i + 1 < text.length &&
			(text.charCodeAt(i + 1) & 0xfc00) === 0xdc00
		) {
			n += 4;
			i++;
		} else n += 3;
	}
	return n;
}

/** Deepest bracket nesting outside strings (JSON.parse takes seconds on megabytes of '['). */
function nesting(text: string, limit: number): number {
	let depth = 0;
	let deepest = 0;
	let inString = false;
	for (let i = 0; i < text.length; i++) {
		const c = text.charCodeAt(i);
		if (inString) {
			if (c === 92) i++;
			else if (c === 34) inString = false;
		} else if (c === 34) inString = true;
		else if (c === 123 || c === 91) {
			if (++depth > deepest) deepest = depth;
			if (deepest > limit) return deepest;
		} else if (c === 125 || c === 93) depth--;
	}
	return deepest;
}

const describe = (v: unknown) =>
	v === null
		? 'null'
		: Array.isArray(v)
			? 'an array'
			: typeof v === 'object'
				? 'an object'
				: `a ${typeof v}`;

interface ZodIssueLike {
	code: string;
	path: PropertyKey[];
	message: string;
	input?: unknown;
	expected?: string;
	keys?: string[];
}

function fromZod(iss: ZodIssueLike): ModelIssue {
	if (iss.code === 'unrecognized_keys' && iss.keys?.length) {
		const more =
			iss.keys.length > 1
				? ` (and ${iss.keys
						.slice(1)
						.map((k) => JSON.stringify(k))
						.join(', ')})`
				: '';
		return issue([...iss.path, iss.keys[0]], `unknown field${more}: not part of ${MODEL_FORMAT}`);
	}
	let message = iss.message;
	if (iss.code === 'invalid_type' && message.startsWith('Invalid input')) {
		message =
			iss.input === undefined
				? 'is required'
				: `must be ${iss.expected === 'array' ? 'an array' : `a ${iss.expected}`}, got ${describe(iss.input)}`;
		if (iss.path.length === 0)
			message = `the file must hold a JSON object (a ${MODEL_FORMAT} model), got ${describe(iss.input)}`;
	}
	return issue(formatPath(iss.path), message);
}

function validate(data: unknown): ParseOutcome {
	const parsed = loopModelSchema.safeParse(data, { reportInput: true });
	if (parsed.success) return { ok: true, model: parsed.data };
	return { ok: false, issue: fromZod(parsed.error.issues[0] as unknown as ZodIssueLike) };
}

export function parseModelText(text: string, fileName?: string): ParseOutcome {
	try {
		if (typeof text !== 'string') return refuse('', 'the file is not text');
		const bytes = utf8Length(text, MAX_MODEL_BYTES);
		if (bytes > MAX_MODEL_BYTES)
			return refuse('', `the file is over the size limit of ${MAX_MODEL_BYTES} bytes (5 MiB)`);
		const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
		const start = body.trimStart();
		const firstLine = start.split(/\r\n|\n|\r/, 1)[0] ?? '';
		const csv =
			!(start.startsWith('{') || start.startsWith('[')) &&
			(looksLikeCsv(firstLine) || /\.csv$/i.test(fileName ?? ''));
		if (csv) {
			const fromCsv = csvToModel(body);
			return fromCsv.ok ? validate(fromCsv.data) : fromCsv;
		}
		if (start === '') return refuse('', 'the file is empty: not JSON');
		if (nesting(body, MAX_NESTING) > MAX_NESTING)
			return refuse('', `not a model: JSON nested deeper than ${MAX_NESTING} levels`);
		let data: unknown;
		try {
			data = JSON.parse(body);
		} catch (e) {
			return refuse('', `not JSON: ${(e as Error).message}`);
		}
		return validate(data);
	} catch (e) {
		return refuse('', `the model could not be read: ${e instanceof Error ? e.message : String(e)}`);
	}
}
