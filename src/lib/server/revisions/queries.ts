import type { EntityManager } from '@mikro-orm/postgresql';
import { MarginReportSchema, RevisionSchema } from '../db/entities';
import { Conflict, NotFound } from '../errors';
import { isUuid } from '../registry/common';
import { revisionView, type RevisionView } from './views';

/** Every revision of a loop, newest first, with each computed one's margins. */
export async function listRevisions(em: EntityManager, loopId: string): Promise<RevisionView[]> {
	if (!isUuid(loopId)) throw new NotFound('No loop with this id.');
	const rows = await em.find(RevisionSchema, { loop: loopId }, { populate: ['uploadedBy'], orderBy: { number: 'desc' } });
	const reports = rows.length
		? await em.find(MarginReportSchema, { revision: { $in: rows.map((r) => r.id) } })
		: [];
	const byRevision = new Map(reports.map((m) => [m.revision.id, m.result]));
	return rows.map((r) => revisionView(r, byRevision.get(r.id)));
}

export async function getRevision(em: EntityManager, id: string): Promise<RevisionView> {
	if (!isUuid(id)) throw new NotFound('No revision with this id.');
	const row = await em.findOne(RevisionSchema, { id }, { populate: ['uploadedBy'] });
	if (!row) throw new NotFound('No revision with this id.');
	const report = await em.findOne(MarginReportSchema, { revision: id });
	return revisionView(row, report?.result);
}

/** Where a revision's model file is stored; refused while the upload has not arrived. */
export async function revisionObject(em: EntityManager, id: string): Promise<{ key: string; fileName: string; sha256: string | null }> {
	if (!isUuid(id)) throw new NotFound('No revision with this id.');
	const row = await em.findOne(RevisionSchema, { id });
	if (!row) throw new NotFound('No revision with this id.');
	if (row.state === 'awaiting-upload') throw new Conflict('The model file of this revision has not been uploaded yet.');
	return { key: row.objectKey, fileName: row.fileName, sha256: row.sha256 ?? null };
}
