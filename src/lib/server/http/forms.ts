import { error, type ActionFailure } from '@sveltejs/kit';
import { setError, type SuperValidated } from 'sveltekit-superforms';
import { DomainError, STATUS } from '../errors';

/**
 * A service's domain error as a superform failure: on the field it names when the form has
 * that field (the message under the input), otherwise above the form. Forbidden and not-found
 * become error pages, as they would for any other request.
 */
export function failForm<T extends Record<string, unknown>>(
	form: SuperValidated<T>,
	e: unknown
): ActionFailure<{ form: SuperValidated<T> }> {
	if (!(e instanceof DomainError)) throw e;
	if (e.code === 'forbidden' || e.code === 'unauthenticated') error(STATUS[e.code], e.message);
	if (e.code === 'not_found') error(404, e.message);
	// "tags.1" → tags, "relaxed.minPhaseMarginDeg" → minPhaseMarginDeg: the forms are flat.
	const parts = e.path?.split('.') ?? [];
	const field = [e.path, parts.at(-1), parts[0]].find((p) => p !== undefined && p in form.data);
	const status = STATUS[e.code] as 400;
	return field
		? (setError(form, field as never, e.message, { status }) as never)
		: (setError(form, e.message, { status }) as never);
}
