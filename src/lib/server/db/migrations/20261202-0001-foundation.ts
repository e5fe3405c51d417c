import type { Migration } from '../migrator';

export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE TABLE shops (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			name varchar(120) NOT NULL,
			phone varchar(40) NOT NULL DEFAULT '',
			email varchar(254) NOT NULL DEFAULT '',
			address varchar(300) NOT NULL DEFAULT '',
			currency char(3) NOT NULL DEFAULT 'USD',
			settings jsonb NOT NULL DEFAULT '{}',
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE TABLE users (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			email varchar(254) NOT NULL,
			name varchar(120) NOT NULL,
			role varchar(20) NOT NULL CHECK (role IN ('owner', 'manager', 'writer', 'technician')),
			password_hash text NOT NULL,
			active boolean NOT NULL DEFAULT true,
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE UNIQUE INDEX users_email_key ON users (lower(email)) WHERE active;
		CREATE INDEX users_shop_idx ON users (shop_id);
		CREATE TABLE sessions (
			id varchar(64) PRIMARY KEY,
			user_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
			expires_at timestamptz NOT NULL,
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX sessions_user_idx ON sessions (user_id);
		CREATE TABLE invites (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			email varchar(254) NOT NULL,
			role varchar(20) NOT NULL CHECK (role IN ('owner', 'manager', 'writer', 'technician')),
			token_hash varchar(64) NOT NULL UNIQUE,
			invited_by uuid NOT NULL REFERENCES users(id),
			expires_at timestamptz NOT NULL,
			used_at timestamptz,
			revoked_at timestamptz,
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX invites_shop_idx ON invites (shop_id);
		CREATE TABLE sign_in_attempts (
			id bigserial PRIMARY KEY,
			email varchar(254) NOT NULL,
			address varchar(100) NOT NULL,
			succeeded boolean NOT NULL,
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX sign_in_attempts_email_idx ON sign_in_attempts (lower(email), created_at);
		CREATE INDEX sign_in_attempts_address_idx ON sign_in_attempts (address, created_at);
		CREATE TABLE audit_events (
			id bigserial PRIMARY KEY,
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			user_id uuid REFERENCES users(id),
			action varchar(60) NOT NULL,
			entity varchar(40) NOT NULL,
			entity_id varchar(64),
			detail jsonb NOT NULL DEFAULT '{}',
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX audit_events_entity_idx ON audit_events (shop_id, entity, entity_id, created_at);
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(
		'DROP TABLE audit_events, sign_in_attempts, invites, sessions, users, shops CASCADE'
	);
};
