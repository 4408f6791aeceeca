import type { EntityManager } from '@mikro-orm/postgresql';
import { enqueueInTx } from '../jobs/enqueue';
import { QUEUES } from '../jobs/queues';

/** Enqueue the compute job on the caller's transaction (committed with the revision row). */
export async function enqueueCompute(tx: EntityManager, revisionId: string): Promise<void> {
	await enqueueInTx(tx, QUEUES.computeRevision, { revisionId }, { tag: revisionId });
}
