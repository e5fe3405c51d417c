import type { Migration } from '../migrator';

export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE TABLE customers (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			name varchar(120) NOT NULL,
			phone varchar(40) NOT NULL DEFAULT '',
			email varchar(254) NOT NULL DEFAULT '',
			address varchar(300) NOT NULL DEFAULT '',
			notes text NOT NULL DEFAULT '',
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX customers_shop_name_idx ON customers (shop_id, lower(name));
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query('DROP TABLE customers');
};
