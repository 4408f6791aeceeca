/**
 * The report's fonts: IBM Plex from @fontsource, which ships each face as subsets (latin,
 * latin-ext, greek, cyrillic …) with the code points each covers in its unicode.json. Text is
 * cut into runs by the subset that covers each character, so a loop named "Łódź pump" or the
 * "α" of a disk-margin label prints in Plex instead of as missing-glyph boxes. The latin subset
 * is the face proper (registered as 'sans', 'bold', 'mono'); the others are registered on first
 * use as 'sans/greek' etc. and embedded only then.
 */
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { sfntFont } from './woff';

type Doc = PDFKit.PDFDocument;
export type Family = 'sans' | 'bold' | 'mono';

const require = createRequire(import.meta.url);
const FACES: Record<Family, { pkg: string; weight: number }> = {
	sans: { pkg: 'ibm-plex-sans', weight: 400 },
	bold: { pkg: 'ibm-plex-sans', weight: 600 },
	mono: { pkg: 'ibm-plex-mono', weight: 400 }
};
// The face proper first, then the others in the order a character is looked up in.
const ORDER = ['latin', 'latin-ext', 'greek', 'cyrillic', 'cyrillic-ext', 'vietnamese'];

interface Subset {
	/** Registered font name. */
	name: string;
	ranges: [number, number][];
	file: string;
}

const parseRanges = (spec: string): [number, number][] =>
	spec.split(',').map((r) => {
		const [a, b] = r.trim().replace(/^U\+/i, '').split('-');
		return [parseInt(a, 16), parseInt(b ?? a, 16)];
	});

const subsetCache = new Map<Family, Subset[]>();

export function subsetsOf(family: Family): Subset[] {
	let subsets = subsetCache.get(family);
	if (subsets) return subsets;
	const { pkg, weight } = FACES[family];
	const dir = dirname(require.resolve(`@fontsource/${pkg}/unicode.json`));
	const unicode = JSON.parse(readFileSync(join(dir, 'unicode.json'), 'utf8')) as Record<
		string,
		string
	>;
	subsets = ORDER.filter((s) => unicode[s]).map((s) => ({
		name: s === 'latin' ? family : `${family}/${s}`,
		ranges: parseRanges(unicode[s]),
		file: join(dir, 'files', `${pkg}-${s}-${weight}-normal.woff`)
	}));
	subsetCache.set(family, subsets);
	return subsets;
}

/** The latin file of a face (what `registerFonts` registers up front). */
export const faceFile = (family: Family) => subsetsOf(family)[0].file;

const current = new WeakMap<Doc, Family>();
const registered = new WeakMap<Doc, Set<string>>();

/** Register the three faces and follow `doc.font(…)` so runs know the family in use. */
export function registerFonts(doc: Doc): void {
	for (const family of Object.keys(FACES) as Family[])
		doc.registerFont(family, sfntFont(faceFile(family)));
	registered.set(doc, new Set(Object.keys(FACES)));
	const font = doc.font.bind(doc);
	doc.font = ((name: string, ...rest: never[]) => {
		if (name in FACES) current.set(doc, name as Family);
		return font(name, ...rest);
	}) as typeof doc.font;
}

const covers = (s: Subset, cp: number) => s.ranges.some(([a, b]) => cp >= a && cp <= b);
// Latin-1 and the punctuation block are in every face's latin subset: most text stops here.
const plain = (text: string) => {
	for (let i = 0; i < text.length; i++) {
		const c = text.charCodeAt(i);
		if (c > 0xff && (c < 0x2000 || c > 0x206f)) return false;
	}
	return true;
};

export interface Run {
	font: string;
	text: string;
}

/** `text` cut into runs of one font each (the family's own font for what no subset covers). */
export function runs(doc: Doc, text: string): Run[] {
	const family = current.get(doc) ?? 'sans';
	if (plain(text)) return [{ font: family, text }];
	const subsets = subsetsOf(family);
	const out: Run[] = [];
	for (const ch of text) {
		const cp = ch.codePointAt(0)!;
		const font = (subsets.find((s) => covers(s, cp)) ?? subsets[0]).name;
		const last = out[out.length - 1];
		if (last?.font === font) last.text += ch;
		else out.push({ font, text: ch });
	}
	const done = registered.get(doc)!;
	for (const r of out) {
		if (done.has(r.font)) continue;
		doc.registerFont(r.font, sfntFont(subsets.find((s) => s.name === r.font)!.file));
		done.add(r.font);
	}
	return out;
}

/** Draw runs in turn, then return to the family's own font. */
export function withRuns(
	doc: Doc,
	text: string,
	draw: (run: Run, index: number, all: Run[]) => void
): void {
	const family = current.get(doc) ?? 'sans';
	const all = runs(doc, text);
	all.forEach((r, i) => {
		if (r.font !== family || i > 0) doc.font(r.font);
		draw(r, i, all);
	});
	if (all.length > 1 || all[0]?.font !== family) doc.font(family);
}

/** Width of `text` in the current font and size, run by run. */
export function widthOf(doc: Doc, text: string): number {
	let w = 0;
	withRuns(doc, text, (r) => (w += doc.widthOfString(r.text)));
	return w;
}
