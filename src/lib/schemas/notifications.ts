/** The notification settings form; shared by the server action and the browser. */
import { z } from 'zod';
import { VERDICT_MAIL_MODES } from '$lib/notifications';

export const verdictMailSchema = z.object({
	mode: z.enum(VERDICT_MAIL_MODES, 'Choose immediate messages or the daily digest.').default('immediate')
});
