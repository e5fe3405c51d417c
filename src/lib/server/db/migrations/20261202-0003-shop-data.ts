import type { Migration } from '../migrator';

// Units, jobs, bench readings against spec sheets, photos and the catalogs the engine prices with.
export const up: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		CREATE EXTENSION IF NOT EXISTS pg_trgm;

		ALTER TABLE shops ADD COLUMN next_job_number integer NOT NULL DEFAULT 1001;
		ALTER TABLE customers ADD COLUMN search_text text NOT NULL DEFAULT '';
		CREATE INDEX customers_search_idx ON customers USING gin (search_text gin_trgm_ops);

		CREATE TABLE units (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			customer_id uuid NOT NULL REFERENCES customers(id) ON DELETE CASCADE,
			kind varchar(20) NOT NULL CHECK (kind IN ('portable', 'inverter', 'standby', 'pressure_washer', 'other')),
			maker varchar(80) NOT NULL DEFAULT '',
			model varchar(80) NOT NULL DEFAULT '',
			serial varchar(80) NOT NULL DEFAULT '',
			running_watts integer CHECK (running_watts >= 0),
			starting_watts integer CHECK (starting_watts >= 0),
			voltage varchar(10) NOT NULL DEFAULT '120/240' CHECK (voltage IN ('120', '120/240')),
			fuel varchar(20) NOT NULL DEFAULT 'gasoline' CHECK (fuel IN ('gasoline', 'propane', 'natural_gas', 'diesel', 'dual_fuel', 'tri_fuel')),
			engine_hours numeric(10,1) CHECK (engine_hours >= 0),
			year_bought integer CHECK (year_bought BETWEEN 1950 AND 2200),
			price_paid numeric(12,2) CHECK (price_paid >= 0),
			condition varchar(12) NOT NULL DEFAULT 'good' CHECK (condition IN ('excellent', 'good', 'fair', 'poor')),
			notes text NOT NULL DEFAULT '',
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX units_customer_idx ON units (shop_id, customer_id);

		CREATE TABLE spec_sheets (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			name varchar(120) NOT NULL,
			applies_to varchar(200) NOT NULL DEFAULT '',
			notes text NOT NULL DEFAULT '',
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX spec_sheets_shop_idx ON spec_sheets (shop_id);

		CREATE TABLE spec_items (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			sheet_id uuid NOT NULL REFERENCES spec_sheets(id) ON DELETE CASCADE,
			position integer NOT NULL DEFAULT 0,
			label varchar(120) NOT NULL,
			unit varchar(10) NOT NULL,
			min_value numeric(14,4),
			max_value numeric(14,4),
			open_above numeric(14,4),
			short_below numeric(14,4),
			running boolean NOT NULL DEFAULT false,
			source varchar(200) NOT NULL DEFAULT ''
		);
		CREATE INDEX spec_items_sheet_idx ON spec_items (sheet_id, position);

		CREATE TABLE jobs (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			number integer NOT NULL,
			unit_id uuid NOT NULL REFERENCES units(id),
			customer_id uuid NOT NULL REFERENCES customers(id),
			complaint text NOT NULL,
			status varchar(20) NOT NULL DEFAULT 'checked_in' CHECK (status IN
				('checked_in', 'diagnosing', 'quoted', 'approved', 'declined', 'in_repair', 'ready', 'picked_up')),
			technician_id uuid REFERENCES users(id),
			diagnostic_fee numeric(12,2) NOT NULL DEFAULT 0 CHECK (diagnostic_fee >= 0),
			promised_on date,
			spec_sheet_id uuid REFERENCES spec_sheets(id) ON DELETE SET NULL,
			failed_component varchar(120) NOT NULL DEFAULT '',
			findings text NOT NULL DEFAULT '',
			search_text text NOT NULL DEFAULT '',
			customer_name varchar(120) NOT NULL DEFAULT '',
			unit_label varchar(170) NOT NULL DEFAULT '',
			technician_name varchar(120),
			lock_version integer NOT NULL DEFAULT 0,
			created_by uuid REFERENCES users(id),
			status_changed_at timestamptz NOT NULL DEFAULT now(),
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now(),
			UNIQUE (shop_id, number)
		);
		CREATE INDEX jobs_board_idx ON jobs (shop_id, created_at DESC, id);
		CREATE INDEX jobs_status_idx ON jobs (shop_id, status, created_at DESC);
		CREATE INDEX jobs_tech_idx ON jobs (shop_id, technician_id, created_at DESC);
		CREATE INDEX jobs_customer_sort_idx ON jobs (shop_id, customer_name, id);
		CREATE INDEX jobs_unit_sort_idx ON jobs (shop_id, unit_label, id);
		CREATE INDEX jobs_tech_sort_idx ON jobs (shop_id, technician_name, id);
		CREATE INDEX jobs_promised_idx ON jobs (shop_id, promised_on, id);
		CREATE INDEX jobs_changed_idx ON jobs (shop_id, status_changed_at, id);
		CREATE INDEX jobs_unit_idx ON jobs (unit_id);
		CREATE INDEX jobs_search_idx ON jobs USING gin (search_text gin_trgm_ops);

		CREATE TABLE readings (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			job_id uuid NOT NULL REFERENCES jobs(id) ON DELETE CASCADE,
			spec_item_id uuid REFERENCES spec_items(id) ON DELETE SET NULL,
			label varchar(120) NOT NULL,
			unit varchar(10) NOT NULL,
			value numeric(14,4),
			over_range boolean NOT NULL DEFAULT false,
			min_value numeric(14,4),
			max_value numeric(14,4),
			result varchar(10) NOT NULL CHECK (result IN ('pass', 'low', 'high', 'open', 'short', 'noted')),
			note varchar(300) NOT NULL DEFAULT '',
			taken_by uuid REFERENCES users(id),
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX readings_job_idx ON readings (job_id, created_at);

		CREATE TABLE photos (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			job_id uuid NOT NULL REFERENCES jobs(id) ON DELETE CASCADE,
			caption varchar(200) NOT NULL DEFAULT '',
			show_customer boolean NOT NULL DEFAULT false,
			mime varchar(30) NOT NULL,
			width integer NOT NULL,
			height integer NOT NULL,
			size_bytes integer NOT NULL,
			data bytea NOT NULL,
			thumb bytea NOT NULL,
			uploaded_by uuid REFERENCES users(id),
			created_at timestamptz NOT NULL DEFAULT now()
		);
		CREATE INDEX photos_job_idx ON photos (job_id, created_at);

		CREATE TABLE parts (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			number varchar(60) NOT NULL,
			description varchar(200) NOT NULL,
			cost numeric(12,2) NOT NULL CHECK (cost >= 0),
			supplier varchar(120) NOT NULL DEFAULT '',
			stock integer NOT NULL DEFAULT 0,
			special_order boolean NOT NULL DEFAULT false,
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now(),
			UNIQUE (shop_id, number)
		);

		CREATE TABLE labour_operations (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			name varchar(120) NOT NULL,
			hours numeric(6,2) NOT NULL CHECK (hours > 0),
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now(),
			UNIQUE (shop_id, name)
		);

		CREATE TABLE replacement_units (
			id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
			shop_id uuid NOT NULL REFERENCES shops(id) ON DELETE CASCADE,
			kind varchar(20) NOT NULL CHECK (kind IN ('portable', 'inverter', 'standby', 'pressure_washer', 'other')),
			name varchar(120) NOT NULL,
			rated_watts integer NOT NULL CHECK (rated_watts >= 0),
			price_new numeric(12,2) NOT NULL CHECK (price_new >= 0),
			life_years numeric(5,1) NOT NULL CHECK (life_years > 0),
			life_hours numeric(8,0) NOT NULL CHECK (life_hours > 0),
			created_at timestamptz NOT NULL DEFAULT now(),
			updated_at timestamptz NOT NULL DEFAULT now(),
			UNIQUE (shop_id, name)
		);
	`);
};

export const down: Migration = async ({ context: sequelize }) => {
	await sequelize.query(`
		DROP TABLE replacement_units, labour_operations, parts, photos, readings, jobs, spec_items, spec_sheets, units;
		DROP INDEX customers_search_idx;
		ALTER TABLE customers DROP COLUMN search_text;
		ALTER TABLE shops DROP COLUMN next_job_number;
	`);
};
