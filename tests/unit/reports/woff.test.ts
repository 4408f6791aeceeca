import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { woffToSfnt } from '../../../src/lib/server/reports/woff';

const require = createRequire(import.meta.url);
const file = (name: string) => readFileSync(require.resolve(`@fontsource/${name}`));

/** The OpenType table checksum: the sum of the table's big-endian uint32 words (zero-padded). */
function checksum(bytes: Buffer): number {
	const padded = Buffer.concat([bytes, Buffer.alloc((4 - (bytes.length % 4)) % 4)]);
	let sum = 0;
	for (let i = 0; i < padded.length; i += 4) sum = (sum + padded.readUInt32BE(i)) >>> 0;
	return sum;
}

describe('WOFF to sfnt for the PDF fonts', () => {
	for (const name of [
		'ibm-plex-sans/files/ibm-plex-sans-latin-400-normal.woff',
		'ibm-plex-mono/files/ibm-plex-mono-latin-400-normal.woff'
	]) {
		it(`unpacks every table of ${name.split('/').pop()} intact`, () => {
			const woff = file(name);
			const sfnt = woffToSfnt(woff);
			const n = woff.readUInt16BE(12);
			expect(sfnt.readUInt32BE(0)).toBe(woff.readUInt32BE(4));
			expect(sfnt.readUInt16BE(4)).toBe(n);
			// The sfnt size WOFF announces is what a faithful unpacking produces.
			expect(sfnt.length).toBe(woff.readUInt32BE(16));
			for (let i = 0; i < n; i++) {
				const at = 12 + i * 16;
				const tag = sfnt.toString('latin1', at, at + 4);
				const offset = sfnt.readUInt32BE(at + 8);
				const length = sfnt.readUInt32BE(at + 12);
				expect(offset % 4, tag).toBe(0);
				expect(length, tag).toBe(woff.readUInt32BE(44 + i * 20 + 12));
				// head's checksum field is defined with checkSumAdjustment counted as zero.
				const table = Buffer.from(sfnt.subarray(offset, offset + length));
				if (tag === 'head') table.writeUInt32BE(0, 8);
				expect(checksum(table), tag).toBe(sfnt.readUInt32BE(at + 4));
			}
		});
	}

	it('refuses a file that is not WOFF 1.0', () => {
		expect(() => woffToSfnt(new Uint8Array([0x77, 0x4f, 0x46, 0x32, 0, 0, 0, 0]))).toThrow(
			/not a WOFF 1.0 font/
		);
	});
});
