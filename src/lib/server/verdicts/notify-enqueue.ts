import type { EntityManager } from '@mikro-orm/postgresql';
import { enqueueManyInTx } from '../jobs/enqueue';
import { QUEUES } from '../jobs/queues';
import type { VerdictChange } from './judge-loops';

/** One notification job per verdict that got worse, committed with the verdict change itself (one statement for all). */
export async function enqueueNotifications(tx: EntityManager, changes: VerdictChange[]): Promise<void> {
	const worse = changes.filter((c) => c.worse);
	await enqueueManyInTx(
		tx,
		QUEUES.notifyVerdict,
		worse.map((c) => ({ data: { eventId: c.eventId }, tag: c.eventId }))
	);
}
