/**
 * Results derived from the registry's tables (how many loops match a filter, the dashboard's
 * counts, whole pages of GET /api/loops) kept in memory until PostgreSQL says one of those
 * tables changed, or until a moment the result names (a page ends when a deviation on it starts
 * or expires).
 *
 * A statement trigger on loop, product, loop_class, app_user (migration …_registry_changes) and
 * deviation (…_list_item) sends a notification on channel `headroom_registry` for every
 * statement that writes them. The
 * web process listens on a connection of its own and bumps a generation number on each; an entry
 * is only valid for the generation it was computed in. Counting the loops a filter matches costs
 * PostgreSQL as much as finding the page itself (every matching row is visited), while someone
 * paging through a filter, or twenty people on the same dashboard, ask for the same total again
 * and again between two writes.
 *
 * Why this is safe:
 *   - an entry is stored under the generation read *before* its query ran: a write that
 *     committed after the query's snapshot notifies after it committed, so it either bumps the
 *     generation before the store (nothing stored) or after it (the entry dies on arrival). A
 *     total is stale at most for the time a notification takes to arrive on loopback;
 *   - a request that itself wrote forgets everything when it ends, so its author's next read
 *     never waits on the notification;
 *   - while the listening connection is down nothing is read or stored (notifications could be
 *     lost), and reconnecting starts a new generation;
 *   - entries also expire after ENTRY_TTL_MS, a bound on any stale value should a notification
 *     ever be lost without the connection reporting it.
 *
 * Only a process that calls startRegistryChanges() caches (the web server); the worker, scripts
 * and tests that do not start it always query.
 */
import pg, { type Client } from 'pg';
import type { EntityManager } from '@mikro-orm/postgresql';

export const CHANNEL = 'headroom_registry';
export const ENTRY_TTL_MS = 60_000;
/** Distinct keys kept; the oldest go first (filters nobody repeats must not grow the map). */
export const MAX_ENTRIES = 2000;
/** Bytes of text and buffers kept (pages of the list are ~70 kB each); the oldest go first. */
export const MAX_BYTES = 32 * 1024 * 1024;
const RECONNECT_MS = 1000;

/**
 * What a request is to do about one result (see shareResult): use `known`; or await `wait`,
 * another request's computation of it (undefined if that failed); or compute it and hand it to
 * `lead` (always: undefined on failure, so that those waiting go on; `until`, a time in ms since
 * the epoch after which the value no longer holds, if it expires before ENTRY_TTL_MS). `current()`: nothing has
 * changed since — false means a known or awaited value may predate a write: compute it afresh.
 * With none of the three, nothing is shared: compute it.
 */
export interface Share<T> {
	known?: T;
	wait?: Promise<T | undefined>;
	lead?: (value: T | undefined, until?: number) => void;
	current: () => boolean;
}
const unshared = <T>(): Share<T> => ({ current: () => true });

/** A result of the current generation (every change empties the map). */
interface Entry {
	value: unknown;
	expiresAt: number;
	bytes: number;
}

const sizeOf = (value: unknown) =>
	typeof value === 'string'
		? value.length * 2
		: value instanceof Uint8Array
			? value.byteLength
			: 64;

class RegistryChanges {
	private generation = 0;
	private client: Client | undefined;
	private stopped = false;
	private retry: ReturnType<typeof setTimeout> | undefined;
	private readonly entries = new Map<string, Entry>();
	private bytes = 0;
	/** Results being computed now, in this generation, by the request that asked first. */
	private readonly pending = new Map<string, Promise<unknown>>();
	/** Resolves once the first LISTEN is in place (or failed), for callers that want to wait. */
	readonly ready: Promise<void>;

	constructor(private readonly url: string) {
		this.ready = this.connect();
	}

	/** The generation a result computed now belongs to; undefined while not listening. */
	stamp(): number | undefined {
		return this.client ? this.generation : undefined;
	}

	private get<T>(key: string): T | undefined {
		const entry = this.entries.get(key);
		if (!entry) return undefined;
		if (Date.now() >= entry.expiresAt) {
			this.drop(key);
			return undefined;
		}
		return entry.value as T;
	}

	private drop(key: string): void {
		const entry = this.entries.get(key);
		if (!entry) return;
		this.bytes -= entry.bytes;
		this.entries.delete(key);
	}

	/**
	 * Keeps value if nothing changed since `stamp` was taken (before the query that made it),
	 * until ENTRY_TTL_MS from now or `until`, whichever comes first.
	 */
	private set(key: string, value: unknown, stamp: number, until = Infinity): void {
		if (!this.client || stamp !== this.generation) return;
		const expiresAt = Math.min(Date.now() + ENTRY_TTL_MS, until);
		const bytes = sizeOf(value);
		if (expiresAt <= Date.now() || bytes > MAX_BYTES) return;
		this.drop(key);
		while (this.entries.size >= MAX_ENTRIES || this.bytes + bytes > MAX_BYTES)
			this.drop(this.entries.keys().next().value!);
		this.entries.set(key, { value, expiresAt, bytes });
		this.bytes += bytes;
	}

	/** What is kept now (for tests and diagnostics). */
	usage(): { entries: number; bytes: number } {
		return { entries: this.entries.size, bytes: this.bytes };
	}

	share<T>(key: string): Share<T> {
		const stamp = this.stamp();
		if (stamp === undefined) return unshared<T>();
		const current = () => this.stamp() === stamp;
		const known = this.get<T>(key);
		if (known !== undefined) return { known, current };
		const wait = this.pending.get(key) as Promise<T | undefined> | undefined;
		if (wait) return { wait, current };
		let settle!: (value: T | undefined) => void;
		const promise = new Promise<T | undefined>((ok) => (settle = ok));
		this.pending.set(key, promise);
		const lead = (value: T | undefined, until?: number) => {
			if (this.pending.get(key) === promise) this.pending.delete(key);
			if (value !== undefined) this.set(key, value, stamp, until);
			settle(value);
		};
		return { lead, current };
	}

	/** Something changed (notified, or written by this process): a new generation, nothing kept. */
	changed(): void {
		this.generation++;
		this.entries.clear();
		this.bytes = 0;
		// requests already waiting still get their leader's value, and see current() false
		this.pending.clear();
	}

	private async connect(): Promise<void> {
		const client: Client = new pg.Client({
			connectionString: this.url,
			application_name: 'headroom-changes'
		});
		let lost = false;
		const onLost = () => {
			if (lost) return;
			lost = true;
			if (this.client === client) this.client = undefined;
			this.changed();
			client.end().catch(() => undefined);
			if (!this.stopped) this.retry = setTimeout(() => void this.connect(), RECONNECT_MS);
		};
		client.on('notification', (message) => {
			if (message.channel === CHANNEL) this.changed();
		});
		client.on('error', onLost);
		client.on('end', onLost);
		try {
			await client.connect();
			await client.query(`listen ${CHANNEL}`);
		} catch {
			onLost();
			return;
		}
		if (this.stopped || lost) {
			await client.end().catch(() => undefined);
			return;
		}
		// Writes made while no one listened went unseen: start afresh.
		this.changed();
		this.client = client;
	}

	async stop(): Promise<void> {
		this.stopped = true;
		clearTimeout(this.retry);
		const client = this.client;
		this.client = undefined;
		this.changed();
		await client?.end().catch(() => undefined);
	}
}

let current: RegistryChanges | undefined;

/** Start listening (idempotent); resolves once listening or once the first attempt failed. */
export function startRegistryChanges(databaseUrl: string): Promise<void> {
	current ??= new RegistryChanges(databaseUrl);
	return current.ready;
}

export async function stopRegistryChanges(): Promise<void> {
	const feed = current;
	current = undefined;
	await feed?.stop();
}

/**
 * An entity manager, or a way to fork a fresh one only when a result has to be computed: a
 * request that finds its answer kept makes no fork (MikroORM's fork costs about 30 µs, a tenth
 * of a kept page's whole answer). A fork made on demand is in no transaction.
 */
export type EmSource = EntityManager | (() => Promise<EntityManager>);

/**
 * What a transaction reads may include its own uncommitted writes, and what it stores would
 * outlive a rollback: inside one, nothing is read from or kept in memory.
 */
const shared = (em: EmSource) =>
	current !== undefined && (typeof em === 'function' || !em.getTransactionContext());

/** The generation now, undefined while not listening (or inside a transaction). */
export const changeStamp = (em: EntityManager): number | undefined =>
	shared(em) ? current!.stamp() : undefined;

/**
 * The result under `key` for this generation: known, being computed by another request, or to
 * be computed by this one (see Share). Concurrent requests after a change compute it once.
 */
export const shareResult = <T>(em: EmSource, key: string): Share<T> =>
	shared(em) ? current!.share<T>(key) : unshared<T>();

/** The entity manager of a source (a new fork each call for a function). */
export const emOf = (source: EmSource): Promise<EntityManager> =>
	typeof source === 'function' ? source() : Promise.resolve(source);

/**
 * Forget everything after this process wrote: a request that changed the registry answers
 * before PostgreSQL's notification arrives, and the same person's next read must not show an
 * older count (see hooks/registry-writes.ts).
 */
export function forgetResults(): void {
	current?.changed();
}

/** What is kept in memory now (zero when not listening). */
export const resultUsage = () => current?.usage() ?? { entries: 0, bytes: 0 };

/**
 * compute() once per generation for this key (always, when not listening or in a transaction);
 * `until(value)`: when the value stops holding even if nothing is written (ms since the epoch).
 */
export async function remembered<T>(
	em: EmSource,
	key: string,
	compute: () => Promise<T>,
	until?: (value: T) => number | undefined
): Promise<T> {
	const share = shareResult<T>(em, key);
	if (share.known !== undefined && share.current()) return share.known;
	if (share.wait) {
		const value = await share.wait;
		if (value !== undefined && share.current()) return value;
	}
	let value: T | undefined;
	try {
		value = await compute();
		return value;
	} finally {
		share.lead?.(value, value === undefined ? undefined : until?.(value));
	}
}
