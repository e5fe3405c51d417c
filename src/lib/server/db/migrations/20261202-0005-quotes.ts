import type { Migration } from '../migrator';

// A quote per job; each send freezes a version that the database itself refuses to change.
export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE TABLE quotes (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			job_id uuid NOT NULL REFERENCES jobs(id) ON DELETE CASCADE,
			draft jsonb NOT NULL,
			lock_version integer NOT NULL DEFAULT 0,
			sent_versions integer NOT NULL DEFAULT 0,
			edited_since_send boolean NOT NULL DEFAULT true,
			updated_by uuid REFERENCES users(id),
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now(),
			UNIQUE (job_id)
		);
		CREATE INDEX quotes_shop_idx ON quotes (shop_id);

		CREATE TABLE quote_versions (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			quote_id uuid NOT NULL REFERENCES quotes(id) ON DELETE CASCADE,
			number integer NOT NULL,
			content jsonb NOT NULL,
			result jsonb NOT NULL,
			content_hash char(64) NOT NULL,
			currency char(3) NOT NULL,
			valid_until date NOT NULL,
			sent_by uuid REFERENCES users(id),
			sent_at timestamptz NOT NULL DEFAULT now(),
			UNIQUE (quote_id, number)
		);
		CREATE INDEX quote_versions_shop_idx ON quote_versions (shop_id, sent_at);

		CREATE FUNCTION quote_versions_frozen() RETURNS trigger LANGUAGE plpgsql AS $$
		BEGIN
			RAISE EXCEPTION 'a sent quote version cannot be changed' USING ERRCODE = 'integrity_constraint_violation';
		END $$;
		CREATE TRIGGER quote_versions_no_update BEFORE UPDATE ON quote_versions FOR EACH ROW EXECUTE FUNCTION quote_versions_frozen();

		CREATE TABLE quote_links (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			quote_id uuid NOT NULL REFERENCES quotes(id) ON DELETE CASCADE,
			version_id uuid NOT NULL REFERENCES quote_versions(id) ON DELETE CASCADE,
			token_hash char(64) NOT NULL UNIQUE,
			expires_at timestamptz NOT NULL,
			revoked_at timestamptz,
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX quote_links_quote_idx ON quote_links (quote_id);

		CREATE TABLE approvals (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			quote_id uuid NOT NULL REFERENCES quotes(id) ON DELETE CASCADE,
			version_id uuid NOT NULL REFERENCES quote_versions(id) ON DELETE CASCADE,
			decision varchar(10) NOT NULL CHECK (decision IN ('approved', 'declined')),
			option_index integer,
			option_label varchar(120),
			signer_name varchar(120),
			reason varchar(1000) NOT NULL DEFAULT '',
			client_address varchar(100) NOT NULL,
			user_agent varchar(400) NOT NULL DEFAULT '',
			version_hash char(64) NOT NULL,
			created_at timestamptz NOT NULL DEFAULT now(),
			UNIQUE (quote_id)
		);
		CREATE INDEX approvals_shop_idx ON approvals (shop_id, created_at);
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP TABLE approvals, quote_links, quote_versions, quotes;
		DROP FUNCTION quote_versions_frozen();
	`);
};
