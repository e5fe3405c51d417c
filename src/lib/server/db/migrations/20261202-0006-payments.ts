import type { Migration } from '../migrator';

// Money in and out of a job: card payments through Stripe Checkout, payments taken at the counter,
// refunds, and every webhook event Stripe sent, stored once by its id.
export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE TABLE payments (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			job_id uuid NOT NULL REFERENCES jobs(id) ON DELETE CASCADE,
			quote_id uuid REFERENCES quotes(id) ON DELETE SET NULL,
			kind varchar(10) NOT NULL CHECK (kind IN ('deposit', 'balance')),
			method varchar(10) NOT NULL CHECK (method IN ('card', 'cash', 'terminal', 'cheque')),
			amount numeric(14,4) NOT NULL CHECK (amount > 0),
			currency char(3) NOT NULL,
			refunded_amount numeric(14,4) NOT NULL DEFAULT 0 CHECK (refunded_amount >= 0 AND refunded_amount <= amount),
			status varchar(20) NOT NULL DEFAULT 'pending'
				CHECK (status IN ('pending', 'paid', 'failed', 'refunded', 'partially_refunded')),
			checkout_session_id varchar(255) UNIQUE,
			payment_intent_id varchar(255),
			reference varchar(120) NOT NULL DEFAULT '',
			last_error varchar(500),
			created_by uuid REFERENCES users(id),
			paid_at timestamptz,
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now(),
			CHECK ((method = 'card') = (checkout_session_id IS NOT NULL))
		);
		CREATE INDEX payments_shop_idx ON payments (shop_id, created_at);
		CREATE INDEX payments_job_idx ON payments (shop_id, job_id, created_at);
		CREATE INDEX payments_intent_idx ON payments (payment_intent_id) WHERE payment_intent_id IS NOT NULL;

		CREATE TABLE refunds (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			payment_id uuid NOT NULL REFERENCES payments(id) ON DELETE CASCADE,
			amount numeric(14,4) NOT NULL CHECK (amount > 0),
			currency char(3) NOT NULL,
			reason varchar(500) NOT NULL,
			stripe_refund_id varchar(255) UNIQUE,
			status varchar(10) NOT NULL DEFAULT 'succeeded' CHECK (status IN ('pending', 'succeeded', 'failed')),
			created_by uuid REFERENCES users(id),
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX refunds_shop_idx ON refunds (shop_id, created_at);
		CREATE INDEX refunds_payment_idx ON refunds (payment_id);

		CREATE TABLE payment_events (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			stripe_event_id varchar(255) NOT NULL UNIQUE,
			type varchar(100) NOT NULL,
			payload jsonb NOT NULL,
			shop_id uuid REFERENCES shops(id) ON DELETE CASCADE,
			payment_id uuid REFERENCES payments(id) ON DELETE SET NULL,
			received_at timestamptz NOT NULL DEFAULT now(),
			processed_at timestamptz,
			flagged boolean NOT NULL DEFAULT false,
			flag_reason varchar(500),
			resolved_at timestamptz,
			resolved_by uuid REFERENCES users(id)
		);
		CREATE INDEX payment_events_shop_idx ON payment_events (shop_id, received_at);
		CREATE INDEX payment_events_flagged_idx ON payment_events (shop_id, received_at) WHERE flagged AND resolved_at IS NULL;
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query('DROP TABLE payment_events, refunds, payments');
};
