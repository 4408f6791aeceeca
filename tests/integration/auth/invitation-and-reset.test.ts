import { describe, expect, it } from 'vitest';
import { listMessages, waitForMessage } from '../support/mail';
import { appEnv, linkIn, me, postSignIn } from './flows';
import { useAuthApp } from './support';

const auth = useAuthApp('auth_links', { signInAdmin: true });
const address = auth.address;

async function invite(email: string, role: string, name = 'Invited Person') {
	const response = await auth.admin.post('/users?/invite', { email, name, role });
	expect(response.status).toBe(200);
	expect(await response.text()).toContain(`Invitation sent to ${email}`);
	return waitForMessage({ to: email, subject: /invited/i });
}

describe('invitations', () => {
	it('mails a single-use link; the invitee sets a password, is signed in with the role given', async () => {
		const email = address('invitee');
		const mail = await invite(email, 'engineer');
		const link = linkIn(mail.text);
		// Only the hash is stored, never the value that was mailed.
		const value = link.split('/').pop()!;
		const [stored] = await auth.sql(
			`select token_hash from one_time_link l join app_user u on u.id = l.user_id where u.email = ?`,
			[email]
		);
		expect(stored.token_hash).toMatch(/^[0-9a-f]{64}$/);
		expect(stored.token_hash).not.toContain(value);

		const invitee = auth.client();
		const page = await invitee.get(link);
		expect(page.status).toBe(200);
		expect(await page.text()).toContain('Welcome to Headroom, Invited Person');

		const set = await invitee.post(
			link,
			{ password: 'a long new passphrase', confirm: 'a long new passphrase' },
			{ headers: { [appEnv.ADDRESS_HEADER]: '192.0.2.30' } }
		);
		expect(set.status).toBe(303);
		expect(set.headers.get('location')).toBe('/');
		const who = await me(invitee);
		expect(who.body.user).toMatchObject({ email, role: 'engineer' });

		// Used up: the same link no longer works, not even to look at.
		const again = await auth.client().get(link);
		expect(await again.text()).toContain('This link no longer works');
		const reuse = await auth
			.client()
			.post(link, { password: 'another passphrase!', confirm: 'another passphrase!' });
		expect(reuse.status).toBe(400);

		const actions = (
			await auth.sql(
				`select action from audit_event where entity_id = (select id::text from app_user where email = ?) order by id`,
				[email]
			)
		).map((r) => r.action as string);
		expect(actions).toEqual(['user.invited', 'user.invitation_accepted']);
	});

	it('refuses to invite an address that already has an account', async () => {
		const response = await auth.admin.post('/users?/invite', {
			email: 'VIEWER@headroom.test',
			name: '',
			role: 'lead'
		});
		expect(response.status).toBe(409);
		expect(await response.text()).toContain('already has an account');
	});

	it('lets only the newest invitation link work, and not after it expires', async () => {
		const email = address('twice');
		const first = linkIn((await invite(email, 'viewer')).text);
		const [{ id }] = await auth.sql(`select id from app_user where email = ?`, [email]);
		const resend = await auth.admin.post('/users?/resend', { userId: id });
		expect(resend.status).toBe(303);
		const second = await waitForMessage({ to: email, where: (m) => linkIn(m.text) !== first });
		const secondLink = linkIn(second.text);
		expect(await (await auth.client().get(first)).text()).toContain('no longer works');
		expect(await (await auth.client().get(secondLink)).text()).toContain('Welcome');
		await auth.sql(
			`update one_time_link set expires_at = now() - interval '1 second' where user_id = ? and used_at is null`,
			[id]
		);
		expect(await (await auth.client().get(secondLink)).text()).toContain('no longer works');
	});
});

describe('password reset', () => {
	it('answers known and unknown addresses identically, mailing only the known one', async () => {
		const known = address('known');
		const invitee = auth.client();
		const link = linkIn((await invite(known, 'viewer')).text);
		await invitee.post(
			link,
			{ password: 'first passphrase 1', confirm: 'first passphrase 1' },
			{ headers: { [appEnv.ADDRESS_HEADER]: '192.0.2.31' } }
		);

		const answers: string[] = [];
		for (const email of [known, address('nobody')]) {
			const response = await auth.client().post('/reset', { email });
			expect(response.status).toBe(200);
			// The page echoes the typed address in its form field, and formsnap numbers its element
			// ids per render; everything else must be the same.
			answers.push(
				(await response.text()).replaceAll(email, 'EMAIL').replace(/formsnap-\d+/g, 'formsnap-N')
			);
		}
		expect(answers[0]).toBe(answers[1]);
		await waitForMessage({ to: known, subject: /reset/i });
		// Give a (wrong) mail to the unknown address time to arrive before saying there is none.
		await new Promise((r) => setTimeout(r, 1500));
		expect(
			(await listMessages()).filter((m) => m.to?.some((a) => a.address === address('nobody')))
		).toEqual([]);
	});

	it('sets a new password with the link, ends older sessions, and the old password stops working', async () => {
		const email = address('resetter');
		const link = linkIn((await invite(email, 'lead')).text);
		const first = auth.client();
		await first.post(
			link,
			{ password: 'old passphrase 123', confirm: 'old passphrase 123' },
			{ headers: { [appEnv.ADDRESS_HEADER]: '192.0.2.32' } }
		);
		expect((await me(first)).status).toBe(200);

		await auth.client().post('/reset', { email });
		const mail = await waitForMessage({ to: email, subject: /reset/i });
		const resetter = auth.client();
		expect(await (await resetter.get(linkIn(mail.text))).text()).toContain('Choose a new password');
		const mismatch = await resetter.post(linkIn(mail.text), {
			password: 'new passphrase 456',
			confirm: 'typo passphrase'
		});
		expect(mismatch.status).toBe(400);
		expect(await mismatch.text()).not.toContain('new passphrase 456');
		const done = await resetter.post(
			linkIn(mail.text),
			{ password: 'new passphrase 456', confirm: 'new passphrase 456' },
			{ headers: { [appEnv.ADDRESS_HEADER]: '192.0.2.33' } }
		);
		expect(done.status).toBe(303);
		expect((await me(resetter)).body.user.email).toBe(email);

		// The session from before the reset is over; so is the old password.
		expect((await me(first)).status).toBe(401);
		const old = await postSignIn(auth.client(), email, 'old passphrase 123', {
			address: '192.0.2.34'
		});
		expect(old.status).toBe(400);
		const fresh = await postSignIn(auth.client(), email, 'new passphrase 456', {
			address: '192.0.2.34'
		});
		expect(fresh.status).toBe(303);
	});

	it('sends at most three reset links an hour to one address', async () => {
		const email = address('flooded');
		await invite(email, 'viewer');
		for (let i = 0; i < 5; i++) await auth.client().post('/reset', { email });
		await new Promise((r) => setTimeout(r, 2000));
		const resets = (await listMessages()).filter(
			(m) => m.to?.some((a) => a.address === email) && /reset/i.test(m.subject)
		);
		expect(resets).toHaveLength(3);
	});
});
