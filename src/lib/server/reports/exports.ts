/**
 * Compliance report exports: request one (the render job is enqueued in the same transaction
 * as the row), read its state, list them, hand out the file once it is ready.
 *
 * Who: every signed-in role, viewers included, may request and read reports. Reports show
 * nothing a viewer cannot already see on the dashboard and loop pages, and audits are exactly
 * when read-only people need the evidence. API tokens need the `read` scope (the route checks).
 * Everyone sees every report: they are about the shared registry, not personal data.
 */
import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import {
	ProductSchema,
	LoopClassSchema,
	ReportExportSchema,
	UserSchema,
	type ReportExport,
	type ReportState
} from '../db/entities';
import { Conflict, Invalid, NotFound } from '../errors';
import { enqueueInTx } from '../jobs/enqueue';
import { QUEUES } from '../jobs/queues';
import { getObjectBytes } from '../storage/s3';
import {
	iso,
	isUuid,
	offsetOf,
	userRef,
	type Actor,
	type PageOf,
	type Paging,
	type UserRef
} from '../registry/common';
import {
	REPORT_FILTER_NAMES,
	cleanFilters,
	reportRequestSchema,
	scopeInWords,
	type ReportFilters,
	type ReportFormat
} from '../../reports/filters';

export const REPORT_PREFIX = 'reports/';

const CONTENT_TYPES: Record<ReportFormat, string> = {
	pdf: 'application/pdf',
	csv: 'text/csv; charset=utf-8'
};

export interface ReportView {
	id: string;
	state: ReportState;
	format: ReportFormat;
	filters: ReportFilters;
	/** The filters in words, as on the report's cover. */
	scope: string;
	requestedBy: UserRef;
	requestedAt: string;
	startedAt: string | null;
	finishedAt: string | null;
	error?: string;
	attempts: number;
	loops?: number;
	verdictCounts?: ReportExport['verdictCounts'];
	sizeBytes?: number;
	sha256?: string;
	engineVersion?: string;
	fileName: string;
	/** Where to download it once `state` is ready. */
	fileUrl: string;
}

export function reportFileName(r: Pick<ReportExport, 'id' | 'format' | 'requestedAt'>): string {
	const stamp = r.requestedAt.toISOString().slice(0, 16).replace(/[-:]/g, '').replace('T', '-');
	return `headroom-compliance-${stamp}-${r.id.slice(0, 8)}.${r.format}`;
}

export function reportView(r: ReportExport): ReportView {
	const view: ReportView = {
		id: r.id,
		state: r.state,
		format: r.format,
		filters: r.filters,
		scope: scopeInWords(r.filters),
		requestedBy: userRef(r.requestedBy),
		requestedAt: r.requestedAt.toISOString(),
		startedAt: iso(r.startedAt),
		finishedAt: iso(r.finishedAt),
		attempts: r.attempts,
		fileName: reportFileName(r),
		fileUrl: `/api/reports/${r.id}/file`
	};
	if (r.errorMessage) view.error = r.errorMessage;
	if (r.loopCount !== null && r.loopCount !== undefined) view.loops = r.loopCount;
	if (r.verdictCounts) view.verdictCounts = r.verdictCounts;
	if (r.sizeBytes !== null && r.sizeBytes !== undefined) view.sizeBytes = r.sizeBytes;
	if (r.sha256) view.sha256 = r.sha256;
	if (r.engineVersion) view.engineVersion = r.engineVersion;
	return view;
}

/** The request body, with errors that name the field: `filters.colour`, `format`. */
function parseRequest(input: unknown): { format: ReportFormat; filters: ReportFilters } {
	const parsed = reportRequestSchema.safeParse(input);
	if (parsed.success)
		return { format: parsed.data.format, filters: cleanFilters(parsed.data.filters) };
	const issue = parsed.error.issues[0];
	const at = issue.path.map(String);
	if (issue.code === 'unrecognized_keys') {
		const field = [...at, issue.keys[0]].join('.');
		const known =
			at[0] === 'filters'
				? ` Filters are ${REPORT_FILTER_NAMES.join(', ')}.`
				: ' The body has format and filters.';
		throw new Invalid(
			`Unknown field${issue.keys.length > 1 ? 's' : ''}: ${issue.keys.join(', ')}.${known}`,
			field
		);
	}
	const message =
		issue.code === 'invalid_type' && issue.input === undefined
			? 'This field is required.'
			: issue.message;
	throw new Invalid(message, at.join('.') || undefined);
}

/** Filters that name a product or class must name one that exists (else the report is empty by typo). */
async function checkReferences(em: EntityManager, f: ReportFilters): Promise<void> {
	if (f.product && !(await em.count(ProductSchema, { key: f.product }))) {
		throw new Invalid(`No product ${f.product}.`, 'filters.product');
	}
	if (f.class && !(await em.count(LoopClassSchema, { key: f.class }))) {
		throw new Invalid(`No loop class ${f.class}.`, 'filters.class');
	}
}

export async function requestReport(
	em: EntityManager,
	actor: Actor,
	input: unknown
): Promise<ReportView> {
	const { format, filters } = parseRequest(input);
	await checkReferences(em, filters);
	const id = randomUUID();
	await em.transactional(async (tx) => {
		tx.create(ReportExportSchema, {
			id,
			format,
			state: 'queued',
			filters,
			requestedBy: tx.getReference(UserSchema, actor.id),
			requestedAt: new Date(),
			// Named by the server from the id only.
			objectKey: `${REPORT_PREFIX}${id}.${format}`,
			attempts: 0
		});
		await tx.flush();
		await enqueueInTx(tx, QUEUES.renderReport, { reportId: id }, { tag: id });
	});
	return getReport(em.fork(), id);
}

async function reportById(em: EntityManager, id: string): Promise<ReportExport> {
	const row = isUuid(id)
		? await em.findOne(ReportExportSchema, { id }, { populate: ['requestedBy'] })
		: null;
	if (!row) throw new NotFound('No such report.');
	return row;
}

export async function getReport(em: EntityManager, id: string): Promise<ReportView> {
	return reportView(await reportById(em, id));
}

/** The report with what it froze in: requirement versions and per loop the judged revision. */
export async function getReportDetail(em: EntityManager, id: string) {
	const row = await reportById(em, id);
	return { ...reportView(row), requirements: row.requirements ?? [], evidence: row.evidence ?? [] };
}

export async function listReports(em: EntityManager, paging: Paging): Promise<PageOf<ReportView>> {
	const [rows, total] = await em.findAndCount(
		ReportExportSchema,
		{},
		{
			populate: ['requestedBy'],
			orderBy: { requestedAt: 'desc', id: 'desc' },
			limit: paging.pageSize,
			offset: offsetOf(paging)
		}
	);
	return { items: rows.map(reportView), total, ...paging };
}

export interface ReportFile {
	bytes: Uint8Array;
	contentType: string;
	fileName: string;
}

export async function reportFile(em: EntityManager, id: string): Promise<ReportFile> {
	const row = await reportById(em, id);
	if (row.state !== 'ready') {
		const why = row.state === 'failed' ? `failed: ${row.errorMessage}` : `still ${row.state}`;
		throw new Conflict(`The report is ${why}.`);
	}
	return {
		bytes: await getObjectBytes(row.objectKey),
		contentType: CONTENT_TYPES[row.format],
		fileName: reportFileName(row)
	};
}

export { CONTENT_TYPES };
