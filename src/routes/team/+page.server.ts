import { fail } from '@sveltejs/kit';
import { z } from 'zod';
import type { Actions, PageServerLoad } from './$types';
import { MANAGERS, manageableRoles } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import { echo, parseForm, type FieldErrors } from '$lib/server/forms';
import * as invites from '$lib/server/invites';
import * as outbox from '$lib/server/mail/outbox';
import * as users from '$lib/server/users';

const idSchema = z.object({ id: z.uuid({ error: 'Pick someone from the list.' }) });

export const load: PageServerLoad = async () => {
	const user = requireRole(MANAGERS);
	const [team, open] = await Promise.all([users.listTeam(user.shopId), invites.listOpen(user.shopId)]);
	return {
		me: user.id,
		canInvite: manageableRoles(user.role),
		team: team.map((u) => ({ id: u.id, name: u.name, email: u.email, role: u.role })),
		invites: open.map((i) => ({ id: i.id, email: i.email, role: i.role, expiresAt: i.expiresAt.toISOString() }))
	};
};

export const actions: Actions = {
	invite: async ({ request, url }) => {
		const user = requireRole(MANAGERS);
		const form = await request.formData();
		const parsed = parseForm(invites.inviteSchema, form);
		if (!parsed.ok) return fail(400, { action: 'invite', message: parsed.message, errors: parsed.errors, ...echo(form) });
		try {
			const { token } = await invites.create(user, parsed.data, url.origin);
			return {
				action: 'invite',
				inviteLink: invites.inviteLink(url.origin, token),
				invitedEmail: parsed.data.email,
				mailConfigured: outbox.mailConfigured()
			};
		} catch (e) {
			if (e instanceof users.UserError) return fail(400, { action: 'invite', message: e.message, errors: (e.field ? { [e.field]: e.message } : {}) as FieldErrors, ...echo(form) });
			throw e;
		}
	},
	revoke: async ({ request }) => {
		const user = requireRole(MANAGERS);
		const parsed = parseForm(idSchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'revoke', message: parsed.errors.id });
		try {
			await invites.revoke(user, parsed.data.id);
			return { action: 'revoke', done: 'Invite withdrawn.' };
		} catch (e) {
			if (e instanceof users.UserError) return fail(400, { action: 'revoke', message: e.message });
			throw e;
		}
	},
	remove: async ({ request }) => {
		const user = requireRole(MANAGERS);
		const parsed = parseForm(idSchema, await request.formData());
		if (!parsed.ok) return fail(400, { action: 'remove', message: parsed.errors.id });
		try {
			await users.remove(user, parsed.data.id);
			return { action: 'remove', done: 'Removed from the team. Their sessions have ended.' };
		} catch (e) {
			if (e instanceof users.UserError) return fail(400, { action: 'remove', message: e.message });
			throw e;
		}
	}
};
