import pg from 'pg';
import { Sequelize } from 'sequelize';
import { initModels } from './models';
import { initOutboxModel } from './outbox-model';
import { initPaymentModels } from './payment-models';
import { initReportModels } from './report-models';

// NUMERIC arrives as a string and stays one until it is wrapped in Decimal; BIGINT counts
// (COUNT(*)) are safe as numbers at the sizes a shop reaches.
pg.types.setTypeParser(pg.types.builtins.INT8, (value: string) => Number(value));

let instance: Sequelize | undefined;

/**
 * Errors that mean the connection was lost (a restarted database drops every pooled connection),
 * or that a statement on its own lost a deadlock and was rolled back whole: safe to run again.
 * Inside a transaction the retry meets the aborted transaction and the error stands.
 */
export const RETRYABLE = [/ECONNRESET/, /ECONNREFUSED/, /terminating connection/, /Connection terminated/, /57P01/, /deadlock detected/];

export function databaseUrl(): string {
	const url = process.env.DATABASE_URL;
	if (!url) throw new Error('DATABASE_URL is not set. `npm start` sets it; see README "Configuration".');
	return url;
}

/** With SQL_LOG=1 every statement is printed (the pool's and the prepared ones). */
export function sqlLog(): ((sql: string) => void) | false {
	return process.env.SQL_LOG === '1' ? console.log : false;
}

/** The one Sequelize instance of this process, created on first use. */
export function db(): Sequelize {
	if (!instance) {
		instance = new Sequelize(databaseUrl(), {
			dialect: 'postgres',
			dialectModule: pg,
			logging: sqlLog(),
			pool: { max: Number(process.env.DB_POOL_MAX ?? 10), min: 0, idle: 10_000, acquire: 30_000 },
			retry: { max: 3, match: RETRYABLE },
			define: { underscored: true, timestamps: true }
		});
		initModels(instance);
		initOutboxModel(instance);
		initPaymentModels(instance);
		initReportModels(instance);
	}
	return instance;
}

export async function closeDb(): Promise<void> {
	if (instance) {
		await instance.close();
		instance = undefined;
	}
}
