// Launcher output: one prefixed line per event, coloured only on a terminal so CI logs stay plain.
const colour = Boolean(process.stdout.isTTY) && !process.env.NO_COLOR;
const PALETTE = [36, 35, 33, 32, 34, 96, 95, 93, 92, 94];
let next = 0;
const assigned = new Map<string, number>();

export const PREFIX_WIDTH = 9;

export function paint(code: number, text: string): string {
	return colour ? `\x1b[${code}m${text}\x1b[0m` : text;
}

export const bold = (text: string) => paint(1, text);
export const red = (text: string) => paint(31, text);
export const green = (text: string) => paint(32, text);
export const dim = (text: string) => paint(2, text);

/** `[name]` padded to a common width, in a colour that stays the same for that name. */
export function prefix(name: string): string {
	let code = assigned.get(name);
	if (code === undefined) {
		code = PALETTE[next++ % PALETTE.length];
		assigned.set(name, code);
	}
	return paint(code, `[${name}]`.padEnd(PREFIX_WIDTH + 2));
}

export function info(message: string): void {
	process.stdout.write(`${prefix('headroom')} ${message}\n`);
}

export function warn(message: string): void {
	process.stderr.write(`${prefix('headroom')} ${paint(33, message)}\n`);
}

export function error(message: string): void {
	process.stderr.write(`${prefix('headroom')} ${red(message)}\n`);
}

export function errorMessage(err: unknown): string {
	return err instanceof Error ? err.message : String(err);
}
