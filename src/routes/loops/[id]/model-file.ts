/** The loop page fetches a revision's stored model file and reads it in the browser. */
import { parseModelText } from '$lib/components/plots/engine';
import type { LoopModel } from '$lib/margins/schema';

export type ModelFetch = { ok: true; model: LoopModel } | { ok: false; message: string };

/** The model of a revision, or what went wrong in words for the page's error state. */
export async function fetchModel(rev: { id: string; fileName: string }): Promise<ModelFetch> {
	let text: string;
	try {
		const response = await fetch(`/api/revisions/${rev.id}/model`);
		if (!response.ok) {
			const body = await response.json().catch(() => null);
			return {
				ok: false,
				message:
					body?.error?.message ??
					`The server answered ${response.status} when asked for the model file.`
			};
		}
		text = await response.text();
	} catch {
		return {
			ok: false,
			message:
				'Could not reach the server to fetch the model file. Check the connection and reload the page.'
		};
	}
	const parsed = parseModelText(text, rev.fileName);
	if (!parsed.ok)
		return {
			ok: false,
			message: `The stored model could not be read in the browser: ${parsed.issue.message}${parsed.issue.path ? ` (at ${parsed.issue.path})` : ''}.`
		};
	return { ok: true, model: parsed.model };
}
