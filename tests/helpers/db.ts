/**
 * Helpers for integration tests against the real (private) MariaDB. The database comes from
 * DB_* in the environment (set by `npm test`). For a manual run:
 *
 *   npm run db:start
 *   DB_NAME=loopledger_test npx vitest run --project integration
 *
 * When DB_PORT or DB_PASSWORD are not set they are read from this working copy's running server
 * (`.data/mariadb.port`, `.data/db-password`). DB_NAME defaults to `loopledger_test`, and every
 * destructive helper refuses a database whose name does not end in `_test`.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { QueryTypes, type Transaction } from 'sequelize';
import { env, resetEnvCache } from '../../src/lib/server/env';
import { closeDatabase, sequelize } from '../../src/lib/server/db/connection';
import { migrateDownAll, migrateUp } from '../../src/lib/server/db/migrator';
import type { DemoSeedSummary } from '../../src/lib/server/seed/demo';

const ROOT = resolve(fileURLToPath(new URL('.', import.meta.url)), '..', '..');
const DATA = join(ROOT, '.data');

function readData(name: string): string | null {
	const file = join(DATA, name);
	return existsSync(file) ? readFileSync(file, 'utf8').trim() || null : null;
}

/**
 * Fills DB_NAME (loopledger_test), DB_PORT and DB_PASSWORD from the local server when unset and
 * returns the database name. Throws when the name does not end in `_test`.
 */
export function useTestDatabaseEnv(): string {
	if (!process.env.DB_NAME) process.env.DB_NAME = 'loopledger_test';
	if (!process.env.DB_PORT) {
		const port = readData('mariadb.port');
		if (port) process.env.DB_PORT = port;
	}
	if (!process.env.DB_PASSWORD) {
		const password = readData('db-password');
		if (password) process.env.DB_PASSWORD = password;
	}
	resetEnvCache();
	const name = env().DB_NAME;
	if (!name.endsWith('_test')) {
		throw new Error(`Integration tests drop tables: DB_NAME must end in _test (got "${name}").`);
	}
	return name;
}

/** Names of the tables in the test database. */
export async function tableNames(): Promise<string[]> {
	const rows = await sequelize().query<{ name: string }>(
		'SELECT TABLE_NAME AS name FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE() ORDER BY TABLE_NAME',
		{ type: QueryTypes.SELECT }
	);
	return rows.map((r) => r.name);
}

/** Drops every table of the test database (foreign keys off on one pinned connection). */
export async function dropAllTables(): Promise<void> {
	useTestDatabaseEnv();
	const db = sequelize();
	await db.transaction(async (transaction: Transaction) => {
		await db.query('SET FOREIGN_KEY_CHECKS = 0', { transaction });
		try {
			const tables = await db.query<{ name: string }>(
				'SELECT TABLE_NAME AS name FROM information_schema.TABLES WHERE TABLE_SCHEMA = DATABASE()',
				{ type: QueryTypes.SELECT, transaction }
			);
			for (const { name } of tables) await db.query(`DROP TABLE IF EXISTS \`${name.replace(/`/g, '``')}\``, { transaction });
		} finally {
			await db.query('SET FOREIGN_KEY_CHECKS = 1', { transaction });
		}
	});
}

/**
 * An empty, fully migrated test database: every table dropped (whatever state an earlier test
 * left), then all migrations up.
 */
export async function resetTestDatabase(): Promise<void> {
	await dropAllTables();
	await migrateUp();
}

/** A freshly migrated test database with the demo data loaded; returns what the seed wrote. */
export async function withSeed(options: { now?: Date } = {}): Promise<DemoSeedSummary> {
	await resetTestDatabase();
	// Loaded on demand so tests that never seed do not load the demo scenario and the engine.
	const { seedDemo } = await import('../../src/lib/server/seed/demo');
	return seedDemo(options);
}

/** Reverts every migration (for the migration test). */
export async function migrateAllDown(): Promise<string[]> {
	useTestDatabaseEnv();
	return migrateDownAll();
}

/** Closes the shared connection pool (call in afterAll). */
export async function closeTestDatabase(): Promise<void> {
	await closeDatabase();
}
