import { createHash } from 'node:crypto';
import { Lucia, TimeSpan, type Adapter, type DatabaseSession } from 'lucia';
import { Op } from 'sequelize';
import { prepared } from '../db/prepared';
import { Session, type Role } from '../db/models';

/** Only a hash of the session token is stored; a leaked table holds no usable cookie. */
export function hashToken(token: string): string {
	return createHash('sha256').update(token).digest('hex');
}

/** lucia's seven adapter methods on the Sequelize models. */
export const sessionAdapter: Adapter = {
	// Runs on every signed-in request: one prepared statement, no model instances.
	async getSessionAndUser(sessionId) {
		const [row] = await prepared<{ userId: string; expiresAt: Date; shopId: string; role: Role; name: string; email: string }>(
			`SELECT s.user_id AS "userId", s.expires_at AS "expiresAt", u.shop_id AS "shopId", u.role, u.name, u.email
			   FROM sessions s JOIN users u ON u.id = s.user_id
			  WHERE s.id = :id AND u.active`,
			{ id: hashToken(sessionId) }
		);
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
