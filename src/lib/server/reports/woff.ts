/**
 * WOFF 1.0 → plain sfnt (TrueType) bytes, once per process. fontkit reads a .woff by inflating
 * the table it needs on every glyph lookup, which made text layout the slowest part of a report
 * (seconds of zlib for a few hundred rows); the same font as an uncompressed sfnt costs nothing.
 * (fontkit's WOFF path also failed on Plex Mono's empty space glyph; the sfnt reads fine.)
 * Format: W3C WOFF File Format 1.0, sections 3–5.
 */
import { readFileSync } from 'node:fs';
import { inflateSync } from 'node:zlib';

export function woffToSfnt(woff: Uint8Array): Buffer {
	const src = Buffer.from(woff.buffer, woff.byteOffset, woff.byteLength);
	if (src.toString('latin1', 0, 4) !== 'wOFF') throw new Error('not a WOFF 1.0 font');
	const flavor = src.readUInt32BE(4);
	const numTables = src.readUInt16BE(12);
	const tables = Array.from({ length: numTables }, (_, i) => {
		const at = 44 + i * 20;
		const offset = src.readUInt32BE(at + 4);
		const compLength = src.readUInt32BE(at + 8);
		const origLength = src.readUInt32BE(at + 12);
		const raw = src.subarray(offset, offset + compLength);
		return {
			tag: src.readUInt32BE(at),
			checksum: src.readUInt32BE(at + 16),
			data: compLength < origLength ? inflateSync(raw) : raw
		};
	});
	const pad = (n: number) => (n + 3) & ~3;
	const headerSize = 12 + 16 * numTables;
	const out = Buffer.alloc(headerSize + tables.reduce((s, t) => s + pad(t.data.length), 0));
	const entrySelector = Math.floor(Math.log2(numTables));
	const searchRange = 2 ** entrySelector * 16;
	out.writeUInt32BE(flavor, 0);
	out.writeUInt16BE(numTables, 4);
	out.writeUInt16BE(searchRange, 6);
	out.writeUInt16BE(entrySelector, 8);
	out.writeUInt16BE(numTables * 16 - searchRange, 10);
	let offset = headerSize;
	tables.forEach((t, i) => {
		const at = 12 + i * 16;
		out.writeUInt32BE(t.tag, at);
		out.writeUInt32BE(t.checksum, at + 4);
		out.writeUInt32BE(offset, at + 8);
		out.writeUInt32BE(t.data.length, at + 12);
		t.data.copy(out, offset);
		offset += pad(t.data.length);
	});
	return out;
}

const cache = new Map<string, Buffer>();

/** The font file at `path` as sfnt bytes (cached: fonts never change while running). */
export function sfntFont(path: string): Buffer {
	let font = cache.get(path);
	if (!font) {
		font = woffToSfnt(readFileSync(path));
		cache.set(path, font);
	}
	return font;
}
