/**
 * Schema migrations from the command line (run with tsx):
 *
 *   npx tsx scripts/migrate.ts up        apply every pending migration
 *   npx tsx scripts/migrate.ts down      revert the last applied migration
 *   npx tsx scripts/migrate.ts down --all   revert every migration (empty schema)
 *   npx tsx scripts/migrate.ts status    list applied and pending migrations
 *
 * `down` destroys data, so it runs only on databases whose name ends in `_test` unless
 * `--allow-data-loss` is given. DB_* come from the environment; DB_PORT and DB_PASSWORD default
 * to this working copy's private server (`npm run db:start`).
 */
import { applyLocalDatabaseEnv } from './db.mjs';
import { env } from '../src/lib/server/env';
import { closeDatabase } from '../src/lib/server/db/connection';
import { migrator } from '../src/lib/server/db/migrator';

applyLocalDatabaseEnv(process.env);

const [command = 'status', ...flags] = process.argv.slice(2);

async function main(): Promise<number> {
	const config = env();
	const where = `${config.DB_NAME} on ${config.DB_HOST}:${config.DB_PORT}`;
	const umzug = migrator();
	switch (command) {
		case 'up': {
			const done = await umzug.up();
			console.log(done.length ? `[migrate] applied to ${where}: ${done.map((m) => m.name).join(', ')}` : `[migrate] ${where} is up to date`);
			return 0;
		}
		case 'down': {
			if (!config.DB_NAME.endsWith('_test') && !flags.includes('--allow-data-loss')) {
				console.error(
					`[migrate] refusing to revert migrations on ${config.DB_NAME}: it drops tables and their data. ` +
						'Use a database whose name ends in _test, or add --allow-data-loss if you mean it.'
				);
				return 1;
			}
			const done = flags.includes('--all') ? await umzug.down({ to: 0 }) : await umzug.down();
			console.log(done.length ? `[migrate] reverted on ${where}: ${done.map((m) => m.name).join(', ')}` : `[migrate] nothing to revert on ${where}`);
			return 0;
		}
		case 'status': {
			const applied = await umzug.executed();
			const pending = await umzug.pending();
			console.log(`[migrate] ${where}`);
			for (const m of applied) console.log(`  applied  ${m.name}`);
			for (const m of pending) console.log(`  pending  ${m.name}`);
			return 0;
		}
		default:
			console.error('Usage: npx tsx scripts/migrate.ts up|down [--all] [--allow-data-loss]|status');
			return 2;
	}
}

try {
	process.exitCode = await main();
} catch (error) {
	const message = error instanceof Error ? error.message : String(error);
	console.error(`[migrate] failed: ${message}`);
	if (/ECONNREFUSED|connect/i.test(message)) console.error('[migrate] is the database running? npm run db:start');
	process.exitCode = 1;
} finally {
	await closeDatabase();
}
