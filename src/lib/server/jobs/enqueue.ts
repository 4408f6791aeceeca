import type PgBoss from 'pg-boss';
import type { EntityManager } from '@mikro-orm/postgresql';
import { txSender } from './boss';
import type { QueueName } from './queues';
import { transactionalDb } from './transactional';

/**
 * Send a job on the caller's open transaction: it exists exactly when the rows it is about were
 * committed. `tag` lands in pg-boss's singleton_key so the reconcile pass can find a row's job.
 */
export async function enqueueInTx(
	tx: EntityManager,
	name: QueueName,
	data: object,
	options: Omit<PgBoss.SendOptions, 'db'> & { tag?: string } = {}
): Promise<string | null> {
	const { tag, ...rest } = options;
	return txSender().send(name, data, { ...rest, ...(tag ? { singletonKey: tag } : {}), db: transactionalDb(tx) });
}

/** Many jobs of one queue in one statement on the caller's transaction (e.g. a re-judge's mails). */
export async function enqueueManyInTx(tx: EntityManager, name: QueueName, items: { data: object; tag?: string }[]): Promise<void> {
	if (!items.length) return;
	await txSender().insert(
		items.map(({ data, tag }) => ({ name, data, ...(tag ? { singletonKey: tag } : {}) })),
		{ db: transactionalDb(tx) }
	);
}
