import type { Migration } from '../migrator';

// Every outgoing e-mail is a row first, so a message survives an SMTP outage or a restart and any
// number of app instances can share the sending.
export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE TABLE outbox_messages (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			job_id uuid REFERENCES jobs(id) ON DELETE SET NULL,
			kind varchar(40) NOT NULL,
			to_address varchar(254) NOT NULL,
			from_name varchar(120) NOT NULL DEFAULT '',
			reply_to varchar(254) NOT NULL DEFAULT '',
			subject varchar(300) NOT NULL,
			text_body text NOT NULL,
			html_body text NOT NULL DEFAULT '',
			attachments jsonb NOT NULL DEFAULT '[]',
			message_id varchar(200) NOT NULL UNIQUE,
			status varchar(10) NOT NULL DEFAULT 'queued' CHECK (status IN ('queued', 'sending', 'sent', 'failed')),
			attempts integer NOT NULL DEFAULT 0 CHECK (attempts >= 0),
			next_attempt_at timestamptz NOT NULL DEFAULT now(),
			last_error text,
			last_error_code varchar(20),
			smtp_response varchar(300),
			sent_at timestamptz,
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now()
		);
		-- While a row is 'sending', next_attempt_at is the end of its claim: one index finds both
		-- what is due and what a stopped instance left half-done.
		CREATE INDEX outbox_messages_due_idx ON outbox_messages (next_attempt_at) WHERE status IN ('queued', 'sending');
		CREATE INDEX outbox_messages_job_idx ON outbox_messages (shop_id, job_id, created_at) WHERE job_id IS NOT NULL;
		CREATE INDEX outbox_messages_shop_idx ON outbox_messages (shop_id, created_at);
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query('DROP TABLE outbox_messages');
};
