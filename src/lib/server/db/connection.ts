/**
 * The one Sequelize instance of the process, created lazily from the validated configuration.
 * With DB_READ_HOSTS set (comma-separated host[:port]), reads go to the replicas and writes to
 * DB_HOST (Sequelize read replication).
 */
import { Sequelize } from 'sequelize';
import { env } from '../env';

let instance: Sequelize | null = null;

/** The shared Sequelize instance (MariaDB, UTC, utf8mb4). */
export function sequelize(): Sequelize {
	if (instance) return instance;
	const e = env();
	const write = { host: e.DB_HOST, port: e.DB_PORT, username: e.DB_USER, password: e.DB_PASSWORD };
	const read = (e.DB_READ_HOSTS ?? '')
		.split(',')
		.map((s) => s.trim())
		.filter(Boolean)
		.map((hp) => {
			const [host, port] = hp.split(':');
			return { ...write, host, port: port ? Number(port) : e.DB_PORT };
		});
	instance = new Sequelize(e.DB_NAME, e.DB_USER, e.DB_PASSWORD, {
		dialect: 'mariadb',
		host: e.DB_HOST,
		port: e.DB_PORT,
		timezone: '+00:00',
		logging: false,
		pool: { max: e.DB_POOL_MAX, min: 0, idle: 10_000, acquire: 30_000 },
		dialectOptions: { charset: 'utf8mb4', connectTimeout: 10_000 },
		define: { charset: 'utf8mb4', collate: 'utf8mb4_unicode_ci', underscored: true },
		...(read.length ? { replication: { read, write } } : {})
	});
	return instance;
}

/** Close the pool (scripts and tests). */
export async function closeDatabase(): Promise<void> {
	if (instance) {
		const i = instance;
		instance = null;
		await i.close();
	}
}
