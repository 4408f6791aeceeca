/**
 * The render-report job: claim the export, gather and freeze what it shows, render the PDF or
 * CSV, store the file under the server's key, mark it ready. Idempotent: a ready export is left
 * alone, and a retried job renders from scratch and overwrites the same object key. A failure
 * stores its message (state `failed`, shown on the reports page) and is rethrown, so pg-boss
 * retries it; a later attempt that succeeds turns the export ready.
 */
import { createHash } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import {
	ENGINE_VERSION,
	parseModelText,
	sampleResponse,
	type CaseResponse,
	type MarginsResult
} from '../../margins';
import type { ReportFilters, ReportFormat } from '../../reports/filters';
import { renderCsv } from '../../reports/csv';
import type { ReportData, ReportLoop } from '../../reports/types';
import { getObjectBytes, putObject } from '../storage/s3';
import type { FrozenLoopEvidence } from '../db/entities';
import { collectLoops, requirementsInForce } from './collect';
import { needsPlotPage, renderPdf, verdictCounts, type LoopPlot } from './pdf';
import { CONTENT_TYPES } from './exports';

export type RenderOutcome = 'ready' | 'skipped';

const DOWNLOADS = 8;

interface Claimed {
	id: string;
	format: ReportFormat;
	filters: ReportFilters;
	object_key: string;
	user_name: string;
	user_email: string;
}

/** Move the export to `rendering` in its own short transaction, so the page sees it move. */
async function claim(em: EntityManager, id: string): Promise<Claimed | null> {
	const rows = await em.getConnection().execute<Claimed[]>(
		`update report_export r set state = 'rendering', started_at = now(), finished_at = null, error_message = null, attempts = attempts + 1
		 from app_user u
		 where r.id = ? and r.state in ('queued', 'rendering', 'failed') and u.id = r.requested_by_id
		 returning r.id, r.format, r.filters, r.object_key, u.name as user_name, u.email as user_email`,
		[id]
	);
	return rows[0] ?? null;
}

/** The judged revision's model, sampled for the plots (160 points per case: ample at plot size). */
export async function sampledResponses(l: ReportLoop, points = 160): Promise<CaseResponse[]> {
	if (!l.revision) return [];
	let bytes: Uint8Array;
	try {
		bytes = await getObjectBytes(l.revision.objectKey);
	} catch (error) {
		const why = error instanceof Error ? error.message : String(error);
		throw new Error(
			`Could not read the model of ${l.product.key}/${l.key} revision ${l.revision.number} from storage (${why}).`,
			{ cause: error }
		);
	}
	const parsed = parseModelText(new TextDecoder().decode(bytes), l.revision.fileName);
	if (!parsed.ok) {
		throw new Error(
			`The model of ${l.product.key}/${l.key} revision ${l.revision.number} no longer parses: ${parsed.issue.message}.`
		);
	}
	return sampleResponse(parsed.model, { points });
}

export const evidenceOf = (l: ReportLoop): FrozenLoopEvidence => ({
	loopId: l.id,
	loopKey: l.key,
	productKey: l.product.key,
	verdict: l.verdict,
	requirementId: l.requirement?.id ?? null,
	revisionId: l.revision?.id ?? null,
	revisionNumber: l.revision?.number ?? null,
	sha256: l.revision?.sha256 ?? null
});

/** Gather, freeze and render one report (no storage write): used by the job and the benchmark. */
export async function buildReport(
	em: EntityManager,
	meta: Pick<ReportData, 'id' | 'format' | 'filters' | 'requestedBy'>
): Promise<{ data: ReportData; bytes: Uint8Array; timings: Record<string, number> }> {
	const t0 = performance.now();
	const cpu0 = process.cpuUsage();
	const cpu = () => {
		const { user, system } = process.cpuUsage(cpu0);
		return (user + system) / 1000;
	};
	const loops = await collectLoops(em, meta.filters);
	const data: ReportData = {
		...meta,
		generatedAt: new Date().toISOString(),
		engineVersion: ENGINE_VERSION,
		requirements: await requirementsInForce(em, loops),
		loops
	};
	const t1 = performance.now();
	if (meta.format === 'csv') {
		const bytes = new TextEncoder().encode(renderCsv(data));
		return {
			data,
			bytes,
			timings: { collect: t1 - t0, render: performance.now() - t1, cpu: cpu() }
		};
	}
	const plots = await loadPlots(em, loops.filter(needsPlotPage));
	const t2 = performance.now();
	const bytes = await renderPdf({ report: data, plots });
	return {
		data,
		bytes,
		timings: { collect: t1 - t0, models: t2 - t1, render: performance.now() - t2, cpu: cpu() }
	};
}

/** Per plotted loop: its judged revision sampled, and the margins stored for that revision. */
async function loadPlots(em: EntityManager, loops: ReportLoop[]): Promise<Map<string, LoopPlot>> {
	const revisionIds = loops.map((l) => l.revision?.id).filter((x): x is string => !!x);
	const stored = revisionIds.length
		? await em
				.getConnection()
				.execute<{ revision_id: string; result: MarginsResult }[]>(
					'select revision_id, result from margin_report where revision_id in (select jsonb_array_elements_text(?::jsonb)::uuid)',
					[JSON.stringify(revisionIds)]
				)
		: [];
	const margins = new Map(stored.map((m) => [m.revision_id, m.result]));
	const plots = new Map<string, LoopPlot>();
	// A few downloads in flight at once: the store's latency, not the CPU, sets the pace here.
	for (let i = 0; i < loops.length; i += DOWNLOADS) {
		const chunk = loops.slice(i, i + DOWNLOADS);
		const cases = await Promise.all(chunk.map((l) => sampledResponses(l)));
		chunk.forEach((l, k) =>
			plots.set(l.id, {
				cases: cases[k],
				margins: (l.revision && margins.get(l.revision.id)) || null
			})
		);
	}
	return plots;
}

export async function renderReport(em: EntityManager, reportId: string): Promise<RenderOutcome> {
	const row = await claim(em, reportId);
	if (!row) return 'skipped';
	const conn = em.getConnection();
	try {
		const { data, bytes, timings } = await buildReport(em, {
			id: row.id,
			format: row.format,
			filters: row.filters,
			requestedBy: { name: row.user_name, email: row.user_email }
		});
		const t = performance.now();
		await putObject(row.object_key, bytes, CONTENT_TYPES[row.format]);
		timings.store = performance.now() - t;
		const phases = Object.entries(timings)
			.map(([k, ms]) => `${k} ${ms.toFixed(0)} ms`)
			.join(', ');
		console.log(
			`[reports] ${row.id} ${row.format}: ${data.loops.length} loops, ${bytes.byteLength} bytes (${phases})`
		);
		await conn.execute(
			`update report_export set state = 'ready', finished_at = now(), size_bytes = ?, sha256 = ?, engine_version = ?,
			        loop_count = ?, verdict_counts = ?::jsonb, requirements = ?::jsonb, evidence = ?::jsonb
			 where id = ? and state = 'rendering'`,
			[
				bytes.byteLength,
				createHash('sha256').update(bytes).digest('hex'),
				data.engineVersion,
				data.loops.length,
				JSON.stringify(verdictCounts(data.loops)),
				JSON.stringify(data.requirements),
				JSON.stringify(data.loops.map(evidenceOf)),
				row.id
			]
		);
		return 'ready';
	} catch (error) {
		const message =
			(error instanceof Error ? error.message : String(error)).slice(0, 1000) ||
			'The render failed.';
		await conn.execute(
			`update report_export set state = 'failed', finished_at = now(), error_message = ? where id = ?`,
			[message, row.id]
		);
		throw error;
	}
}
