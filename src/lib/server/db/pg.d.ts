// The project has no @types/pg; the part of the driver that db/registry-changes.ts uses.
declare module 'pg' {
	interface Notification {
		channel: string;
		payload?: string;
	}
	class Client {
		constructor(config: { connectionString: string; application_name?: string });
		connect(): Promise<void>;
		query(sql: string): Promise<unknown>;
		end(): Promise<void>;
		on(event: 'notification', listener: (message: Notification) => void): this;
		on(event: 'error' | 'end', listener: (error?: unknown) => void): this;
	}
	const pg: { Client: typeof Client };
	export default pg;
	export type { Client, Notification };
}
