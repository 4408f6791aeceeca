import type { MarginsResult } from '../../margins/types';
import type { Revision, RevisionState } from '../db/entities/revision';

export interface RevisionView {
	id: string;
	loopId: string;
	number: number;
	state: RevisionState;
	fileName: string;
	sizeBytes: number | null;
	sha256: string | null;
	note: string;
	uploadedBy: { id: string; name: string } | null;
	uploadedAt: string;
	computedAt: string | null;
	error?: { message: string; path: string };
	jobError?: string;
	margins?: MarginsResult;
}

export function revisionView(r: Revision, margins?: MarginsResult | null): RevisionView {
	const view: RevisionView = {
		id: r.id,
		loopId: r.loop.id,
		number: r.number,
		state: r.state as RevisionState,
		fileName: r.fileName,
		sizeBytes: r.sizeBytes ?? null,
		sha256: r.sha256 ?? null,
		note: r.note,
		// Populated where the caller loaded it; a bare reference has no name yet.
		uploadedBy: { id: r.uploadedBy.id, name: r.uploadedBy.name ?? '' },
		uploadedAt: r.uploadedAt.toISOString(),
		computedAt: r.computedAt ? r.computedAt.toISOString() : null
	};
	if (r.errorMessage) view.error = { message: r.errorMessage, path: r.errorPath ?? '' };
	if (r.jobError && r.state !== 'computed' && r.state !== 'rejected') view.jobError = r.jobError;
	if (margins) view.margins = margins;
	return view;
}
