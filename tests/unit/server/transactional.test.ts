import { describe, expect, it } from 'vitest';
import { toPositional } from '../../../src/lib/server/jobs/transactional';

describe('pg-boss statements on a knex connection', () => {
	it('turns $n placeholders into ordered ? bindings, repeating recurring ones', () => {
		const out = toPositional('select $2, $1, $2::int', ['a', 'b']);
		expect(out.sql).toBe('select ?, ?, ?::int');
		expect(out.bindings).toEqual(['b', 'a', 'b']);
	});

	it('sends undefined as NULL and escapes literal question marks', () => {
		const out = toPositional("select $1, data ? 'k'", [undefined]);
		expect(out.bindings).toEqual([null]);
		expect(out.sql).toBe("select ?, data \\? 'k'");
	});

	it('handles placeholders beyond $9', () => {
		const values = Array.from({ length: 12 }, (_, i) => i + 1);
		expect(toPositional('$12,$1,$10', values).bindings).toEqual([12, 1, 10]);
	});
});
