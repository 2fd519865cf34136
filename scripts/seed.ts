/**
 * Loads the demo data of the invented Brackwater Provisions scenario (run with tsx):
 *
 *   npx tsx scripts/seed.ts                 seed; refuses when the database already has users
 *   npx tsx scripts/seed.ts --if-empty      seed only when there are no users (what npm start does)
 *   npx tsx scripts/seed.ts --force         on a database whose name ends in _test only: empty it
 *                                           (all migrations down and up again), then seed
 *   npx tsx scripts/seed.ts --print-demo-users   print the demo sign-ins as JSON (no database)
 *
 * DB_* come from the environment; DB_PORT and DB_PASSWORD default to this working copy's private
 * server (`npm run db:start`). Never seeds over real data.
 */
import { applyLocalDatabaseEnv } from './db.mjs';
import { env } from '../src/lib/server/env';
import { closeDatabase } from '../src/lib/server/db/connection';
import { migrator } from '../src/lib/server/db/migrator';
import { DEMO_USERS } from '../src/lib/server/seed/demo-users';
import { DemoSeedRefused, seedDemo } from '../src/lib/server/seed/demo';

applyLocalDatabaseEnv(process.env);
const flags = new Set(process.argv.slice(2));

async function main(): Promise<number> {
	if (flags.has('--print-demo-users')) {
		const list = DEMO_USERS.map(({ email, name, role, password, duty }) => ({ email, name, role, password, duty }));
		process.stdout.write(`${JSON.stringify(list)}\n`);
		return 0;
	}
	const known = new Set(['--if-empty', '--force']);
	const unknown = [...flags].filter((f) => !known.has(f));
	if (unknown.length) {
		console.error(`[seed] unknown option ${unknown.join(' ')}. Usage: npx tsx scripts/seed.ts [--if-empty | --force | --print-demo-users]`);
		return 2;
	}
	const config = env();
	const where = `${config.DB_NAME} on ${config.DB_HOST}:${config.DB_PORT}`;
	const umzug = migrator();
	if (flags.has('--force')) {
		if (!config.DB_NAME.endsWith('_test')) {
			console.error(`[seed] --force empties the database first and is only allowed on databases whose name ends in _test (not ${config.DB_NAME}).`);
			return 1;
		}
		await umzug.down({ to: 0 });
		await umzug.up();
		console.log(`[seed] emptied ${where} (all migrations down and up again)`);
	} else if ((await umzug.pending()).length) {
		console.error(`[seed] ${where} has pending migrations: run npm run migrate first.`);
		return 1;
	}
	try {
		const summary = await seedDemo();
		console.log(`[seed] loaded the demo data into ${where}:`);
		for (const [what, count] of Object.entries(summary.counts)) console.log(`  ${String(count).padStart(4)} ${what}`);
		return 0;
	} catch (error) {
		if (error instanceof DemoSeedRefused) {
			if (flags.has('--if-empty')) {
				console.log(`[seed] ${where} already has users: demo data not loaded (existing data left as it is)`);
				return 0;
			}
			console.error(`[seed] refused: ${error.message}`);
			return 1;
		}
		throw error;
	}
}

try {
	process.exitCode = await main();
} catch (error) {
	const message = error instanceof Error ? error.message : String(error);
	console.error(`[seed] failed: ${message}`);
	if (/ECONNREFUSED/i.test(message)) console.error('[seed] is the database running? npm run db:start');
	process.exitCode = 1;
} finally {
	await closeDatabase();
}
