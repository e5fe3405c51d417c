import { createHash } from 'node:crypto';
import { Lucia, TimeSpan, type Adapter, type DatabaseSession } from 'lucia';
import { Op } from 'sequelize';
import { prepared } from '../db/prepared';
import { together } from '../db/together';
import { Session, type Role } from '../db/models';

/** Only a hash of the session token is stored; a leaked table holds no usable cookie. */
export function hashToken(token: string): string {
	return createHash('sha256').update(token).digest('hex');
}

interface SessionRow { id: string; userId: string; expiresAt: Date; shopId: string; role: Role; name: string; email: string }

/**
 * Runs on every signed-in request: one prepared statement, no model instances. Checks asked for
 * while one is on its way go together in the next statement (see `together`); each request is
 * still answered from a statement sent after it arrived. The list of hashes is a sub-select so
 * that PostgreSQL keeps one plan for any number of them.
 */
const sessionRows = together(async (ids: string[]) => {
	const rows = await prepared<SessionRow>(
		`SELECT s.id, s.user_id AS "userId", s.expires_at AS "expiresAt", u.shop_id AS "shopId", u.role, u.name, u.email
		   FROM sessions s JOIN users u ON u.id = s.user_id
		  WHERE s.id = ANY((SELECT :ids::text[])::text[]) AND u.active`,
		{ ids }
	);
	return new Map(rows.map((row) => [row.id, row]));
});

/** lucia's seven adapter methods on the Sequelize models. */
export const sessionAdapter: Adapter = {
	async getSessionAndUser(sessionId) {
		const row = await sessionRows(hashToken(sessionId));
		if (!row) return [null, null];
		const session: DatabaseSession = { id: sessionId, userId: row.userId, expiresAt: new Date(row.expiresAt), attributes: {} };
		return [session, { id: row.userId, attributes: { shopId: row.shopId, role: row.role, name: row.name, email: row.email } }];
	},
	async getUserSessions(userId) {
		const rows = await Session.findAll({ where: { userId: String(userId) } });
		return rows.map((r) => ({ id: r.id, userId: r.userId, expiresAt: r.expiresAt, attributes: {} }));
	},
	async setSession(session) {
		await Session.create({ id: hashToken(session.id), userId: String(session.userId), expiresAt: session.expiresAt });
	},
	async updateSessionExpiration(sessionId, expiresAt) {
		await Session.update({ expiresAt }, { where: { id: hashToken(sessionId) } });
	},
	async deleteSession(sessionId) {
		await Session.destroy({ where: { id: hashToken(sessionId) } });
	},
	async deleteUserSessions(userId) {
		await Session.destroy({ where: { userId: String(userId) } });
	},
	async deleteExpiredSessions() {
		await Session.destroy({ where: { expiresAt: { [Op.lte]: new Date() } } });
	}
};

const secureCookies = (process.env.ORIGIN ?? '').startsWith('https://') || process.env.COOKIE_SECURE === 'true';

export const lucia = new Lucia(sessionAdapter, {
	sessionExpiresIn: new TimeSpan(14, 'd'),
	sessionCookie: {
		name: 'mendwise_session',
		attributes: { secure: secureCookies, sameSite: 'lax' }
	},
	getUserAttributes: (attributes) => ({
		shopId: attributes.shopId,
		role: attributes.role,
		name: attributes.name,
		email: attributes.email
	})
});

declare module 'lucia' {
	interface Register {
		Lucia: typeof lucia;
		DatabaseUserAttributes: { shopId: string; role: Role; name: string; email: string };
	}
}
