import type { EntityManager } from '@mikro-orm/postgresql';

/**
 * Password sign-in limits, counted in PostgreSQL so every web replica sees the same numbers.
 * Per account: failures since its last success within the window (a person who mistypes and
 * then gets in starts afresh). Per client address: all failures within the window, whichever
 * accounts they aimed at (a success with one's own account does not reset it).
 */
export const LIMITS = {
	windowMinutes: 15,
	failuresPerAccount: 5,
	failuresPerAddress: 30
};

export interface Attempt {
	id: string;
	limited: boolean;
}

/**
 * Record an attempt as failed *before* checking the password, then count: concurrent guesses
 * each see the others, so a burst cannot slip past the limit between check and write.
 */
export async function beginAttempt(em: EntityManager, email: string, address: string): Promise<Attempt> {
	const conn = em.getConnection();
	const [row] = await conn.execute<{ id: string }[]>(
		`insert into sign_in_attempt (email, address, succeeded, at) values (?, ?, false, now()) returning id`,
		[email, address]
	);
	const [counts] = await conn.execute<{ account: string; address: string }[]>(
		`select
		   (select count(*) from sign_in_attempt a
		     where a.email = ? and not a.succeeded and a.at > now() - make_interval(mins => ?)
		       and a.at > coalesce((select max(s.at) from sign_in_attempt s where s.email = ? and s.succeeded), '-infinity')
		   ) as account,
		   (select count(*) from sign_in_attempt a
		     where a.address = ? and not a.succeeded and a.at > now() - make_interval(mins => ?)
		   ) as address`,
		[email, LIMITS.windowMinutes, email, address, LIMITS.windowMinutes]
	);
	// Rows older than a day no longer count; trim this account's and address's history as we go.
	// TODO: rows of addresses and e-mails that never return stay until a scheduled purge (a
	// pg-boss cron job deleting `at < now() - interval '1 day'`) is added with the other jobs.
	await conn.execute(
		`delete from sign_in_attempt where (email = ? or address = ?) and at < now() - interval '1 day'`,
		[email, address]
	);
	return {
		id: String(row.id),
		limited:
			Number(counts.account) > LIMITS.failuresPerAccount ||
			Number(counts.address) > LIMITS.failuresPerAddress
	};
}

export async function markSucceeded(em: EntityManager, attempt: Attempt): Promise<void> {
	await em.getConnection().execute(`update sign_in_attempt set succeeded = true where id = ?`, [attempt.id]);
}
