import type { EntityManager } from '@mikro-orm/postgresql';
import { enqueueInTx } from '../jobs/enqueue';
import { QUEUES } from '../jobs/queues';
import type { VerdictChange } from './judge-loops';

/** One notification job per verdict that got worse, committed with the verdict change itself. */
export async function enqueueNotifications(tx: EntityManager, changes: VerdictChange[]): Promise<void> {
	for (const change of changes.filter((c) => c.worse)) {
		await enqueueInTx(tx, QUEUES.notifyVerdict, { eventId: change.eventId }, { tag: change.eventId });
	}
}
