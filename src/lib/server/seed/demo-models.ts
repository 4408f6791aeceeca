/**
 * Upload the demo scenario's model files (fixtures/demo, listed in its manifest) through the
 * same path as any user's upload, each as its loop owner's first revision; the worker computes
 * them, so the dashboard starts with real verdicts. Only loops without a revision get one.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { EntityManager } from '@mikro-orm/postgresql';
import { LoopSchema, RevisionSchema } from '../db/entities';
import { uploadRevision } from '../revisions/upload';

interface Manifest {
	format: 'headroom-demo-manifest/1';
	loops: Record<string, string>;
}

export async function uploadDemoModels(em: EntityManager, dir = 'fixtures/demo'): Promise<number> {
	const manifest = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8')) as Manifest;
	let uploaded = 0;
	for (const [ref, file] of Object.entries(manifest.loops)) {
		const [productKey, loopKey] = ref.split('/');
		const loop = await em.fork().findOne(
			LoopSchema,
			{ key: loopKey, product: { key: productKey } },
			{ populate: ['owner'] }
		);
		if (!loop) throw new Error(`demo manifest names ${ref}, which the seed did not create`);
		if ((await em.fork().count(RevisionSchema, { loop: loop.id })) > 0) continue;
		const owner = loop.owner;
		await uploadRevision(em.fork(), { id: owner.id, email: owner.email, name: owner.name, role: owner.role }, loop.id, {
			fileName: file,
			bytes: readFileSync(join(dir, file)),
			note: 'Demo scenario model'
		});
		uploaded++;
	}
	return uploaded;
}
