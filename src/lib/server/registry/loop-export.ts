/**
 * The loop list as CSV: every row matching the filters, in the list's order, streamed in chunks
 * so a large registry never sits in memory as one string. Bounded (MAX_EXPORT_ROWS): beyond
 * that a person is asked to narrow the filters rather than wait for a file no one opens.
 * Columns (see EXPORT_COLUMNS): the loop, its verdict, and for phase, upper gain, delay and
 * modulus margin the worst-case actual value, the target, the shortfall and the status.
 */
import type { EntityManager } from '@mikro-orm/postgresql';
import { csvRow } from '../../registry/csv';
import { MARGIN_COLUMNS, marginCell } from '../../registry/margin-cells';
import { Invalid } from '../errors';
import { countLoops, queryLoops, type LoopFilters, type LoopListItem } from './loops';

export const MAX_EXPORT_ROWS = 50_000;
const CHUNK = 2000;

export const EXPORT_COLUMNS = [
	'loop_id',
	'product',
	'class',
	'loop_key',
	'loop_name',
	'owner_email',
	'tags',
	'verdict',
	'active_deviations',
	'failing',
	'worst_shortfall_ratio',
	...MARGIN_COLUMNS.flatMap((c) => [
		`${c.csv}`,
		`${c.csv}_target`,
		`${c.csv}_shortfall`,
		`${c.csv}_status`
	]),
	'judged_at',
	'verdict_changed_at',
	'updated_at'
];

function record(l: LoopListItem): string {
	const margins = MARGIN_COLUMNS.flatMap((column) => {
		const cell = marginCell(l, column);
		return [cell.actual, cell.required, cell.shortfall, cell.status];
	});
	return csvRow([
		l.id,
		l.product.key,
		l.class.key,
		l.key,
		l.name,
		l.owner.email,
		l.tags.join(' '),
		l.verdict,
		l.activeDeviations,
		l.failing.join(' '),
		l.worstShortfall,
		...margins,
		l.judgedAt,
		l.verdictChangedAt,
		l.updatedAt
	]);
}

/** Checks the size first (a 400 before any byte is sent), then streams header and rows. */
export async function exportLoopsCsv(
	em: EntityManager,
	f: LoopFilters
): Promise<{ rows: number; stream: ReadableStream<Uint8Array> }> {
	const rows = await countLoops(em, f);
	if (rows > MAX_EXPORT_ROWS) {
		throw new Invalid(
			`${rows} loops match; an export holds at most ${MAX_EXPORT_ROWS}. Narrow the filters.`
		);
	}
	const encoder = new TextEncoder();
	let offset = 0;
	let headerSent = false;
	const stream = new ReadableStream<Uint8Array>({
		async pull(controller) {
			if (!headerSent) {
				headerSent = true;
				controller.enqueue(encoder.encode(csvRow(EXPORT_COLUMNS)));
				return;
			}
			// Offsets over the list's total order (ties broken by id); a loop edited meanwhile
			// shows with its newest values.
			const chunk = offset < rows ? await queryLoops(em, f, CHUNK, offset) : [];
			offset += CHUNK;
			if (!chunk.length) return controller.close();
			controller.enqueue(encoder.encode(chunk.map(record).join('')));
		}
	});
	return { rows, stream };
}
