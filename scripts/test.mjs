#!/usr/bin/env node
/**
 * `npm test`: every check, in order, on a fresh machine or a working copy.
 *   prepare (npm ci, mariadb-server, chromium) → private database, `loopledger_test` dropped and
 *   recreated → svelte-kit sync + svelte-check (0 errors) → vitest unit → vitest integration →
 *   vite build → migrate + demo seed of loopledger_test → built server on a free port →
 *   vitest browser (BASE_URL) → stop what this run started.
 * Ends with one line `tests: N passed, M failed[, K skipped]`; exits non-zero when anything failed
 * or a project ran no test. A failed step that is not a test (svelte-check, build, server start, a
 * test file that could not load) counts as one failure in that line.
 *
 * Dependency-free (only `node:` imports): it runs before node_modules exists.
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, openSync, closeSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, UserFacingError, isMain, prepare } from './prepare.mjs';
import * as db from './db.mjs';
import { appServerEnv, bin, run, runningChildren, startServices, waitForHttp } from './start.mjs';

const RESULTS = join(ROOT, 'test-results');
const TEST_AUTH_SECRET = 'test-only-auth-secret-not-for-production-0123456789';

function say(message) {
	process.stdout.write(`\n[test] ${message}\n`);
}

/** One row of the final table per step. */
const results = [];
let interrupted = null;
let appServer = null;
let services = null;

/** Reads vitest's JSON report; null when it was not written. */
function readReport(file) {
	if (!existsSync(file)) return null;
	try {
		return JSON.parse(readFileSync(file, 'utf8'));
	} catch {
		return null;
	}
}

/** Runs one vitest project and records its counts; a project with 0 tests counts as failed. */
async function vitestProject(project, env) {
	const file = join(RESULTS, `vitest-${project}.json`);
	rmSync(file, { force: true });
	say(`vitest ${project}`);
	const started = Date.now();
	const { code, signal } = await run(
		bin('vitest'),
		['run', '--project', project, '--passWithNoTests', '--reporter=default', '--reporter=json', `--outputFile.json=${file}`],
		{ env }
	);
	const report = readReport(file);
	const passed = report?.numPassedTests ?? 0;
	const failed = report?.numFailedTests ?? 0;
	const skipped = (report?.numPendingTests ?? 0) + (report?.numTodoTests ?? 0);
	const total = passed + failed + skipped;
	const problems = [];
	if (!report) problems.push('no JSON report written');
	if (report && total === 0) problems.push('ran no test');
	if ((code !== 0 || signal) && failed === 0) problems.push(`vitest exited ${signal ?? code} (a test file failed to load or a hook failed)`);
	results.push({
		step: `vitest ${project}`,
		passed,
		failed: failed + (problems.length ? 1 : 0),
		skipped,
		note: problems.join('; '),
		seconds: (Date.now() - started) / 1000
	});
}

/** Runs a non-test step (svelte-check, build …); counts one failure when it fails. */
async function step(name, command, args, env) {
	say(name);
	const started = Date.now();
	const { code, signal } = await run(command, args, { env });
	const ok = code === 0 && !signal;
	const seconds = (Date.now() - started) / 1000;
	results.push({ step: name, passed: 0, failed: ok ? 0 : 1, skipped: 0, note: ok ? '' : `exit ${signal ?? code}`, check: true, seconds });
	return ok;
}

function recordFailure(name, message) {
	results.push({ step: name, passed: 0, failed: 1, skipped: 0, note: message, check: true });
}

/** Starts the built server against loopledger_test on a free port; returns its base URL. */
async function startAppServer(dbEnv) {
	const port = await db.freePort(Number(process.env.TEST_PORT) || 4173);
	mkdirSync(RESULTS, { recursive: true });
	const logFile = join(RESULTS, 'app-server.log');
	const log = openSync(logFile, 'w');
	const env = { ...appServerEnv({ port, dbEnv, demo: true, authSecret: TEST_AUTH_SECRET }), ORIGIN: `http://127.0.0.1:${port}` };
	appServer = spawn(process.execPath, ['build'], { cwd: ROOT, env, stdio: ['ignore', log, log] });
	closeSync(log);
	runningChildren.add(appServer);
	appServer.once('exit', () => runningChildren.delete(appServer));
	say(`app server on http://127.0.0.1:${port} (log: test-results/app-server.log)`);
	try {
		await waitForHttp(`http://127.0.0.1:${port}/`, appServer);
	} catch (error) {
		const tail = existsSync(logFile) ? readFileSync(logFile, 'utf8').trimEnd().split('\n').slice(-30).join('\n') : '';
		throw new UserFacingError(`${error.message}\n--- last lines of the app server log ---\n${tail}`);
	}
	return `http://127.0.0.1:${port}`;
}

async function stopAppServer() {
	if (!appServer || appServer.exitCode !== null || appServer.signalCode !== null) return;
	const server = appServer;
	const gone = new Promise((r) => server.once('exit', r));
	server.kill('SIGTERM');
	const timer = setTimeout(() => server.kill('SIGKILL'), 10_000);
	await gone;
	clearTimeout(timer);
}

async function cleanup() {
	await stopAppServer();
	if (services) {
		await services.stopAll();
		services = null;
	}
}

function summary() {
	const passed = results.reduce((n, r) => n + r.passed, 0);
	const failed = results.reduce((n, r) => n + r.failed, 0);
	const skipped = results.reduce((n, r) => n + r.skipped, 0);
	const lines = ['', '[test] summary'];
	for (const r of results) {
		const counts = r.check ? (r.failed ? 'FAILED' : 'ok') : `${r.passed} passed, ${r.failed} failed${r.skipped ? `, ${r.skipped} skipped` : ''}`;
		const time = r.seconds === undefined ? '' : `${Math.round(r.seconds)} s`.padStart(6);
		lines.push(`  ${r.step.padEnd(28)}${time}  ${counts}${r.note ? `  (${r.note})` : ''}`);
	}
	if (interrupted) lines.push(`  interrupted by ${interrupted}`);
	lines.push('', `tests: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
	process.stdout.write(`${lines.join('\n')}\n`);
	return failed;
}

async function main() {
	const started = Date.now();
	prepare({ browser: true });
	results.push({ step: 'prepare', passed: 0, failed: 0, skipped: 0, note: '', check: true, seconds: (Date.now() - started) / 1000 });
	mkdirSync(RESULTS, { recursive: true });

	services = await startServices({ mode: 'test', databaseName: db.TEST_DATABASE });
	db.createDatabase(db.TEST_DATABASE, { fresh: true });
	const env = { ...process.env, ...services.env, DB_NAME: db.TEST_DATABASE };
	const tsx = bin('tsx');

	const steps = [
		async () => {
			if (await step('svelte-kit sync', bin('svelte-kit'), ['sync'], env)) {
				await step('svelte-check', bin('svelte-check'), ['--tsconfig', './tsconfig.json', '--fail-on-warnings=false'], env);
			}
		},
		() => vitestProject('unit', env),
		() => vitestProject('integration', env),
		async () => {
			const built = await step('vite build', bin('vite'), ['build'], { ...env, NODE_ENV: 'production' });
			if (!built) {
				recordFailure('vitest browser', 'not run: the build failed');
				return;
			}
			db.createDatabase(db.TEST_DATABASE, { fresh: true });
			if (!(await step('migrate loopledger_test', tsx, ['scripts/migrate.ts', 'up'], env))) return;
			if (!(await step('demo seed loopledger_test', tsx, ['scripts/seed.ts'], env))) return;
			let baseUrl;
			try {
				baseUrl = await startAppServer(services.env);
			} catch (error) {
				recordFailure('app server', error instanceof Error ? error.message : String(error));
				return;
			}
			await vitestProject('browser', { ...env, BASE_URL: baseUrl });
		}
	];
	for (const s of steps) {
		if (interrupted) break;
		await s();
	}
	say(`finished in ${Math.round((Date.now() - started) / 1000)} s`);
}

function onSignal(signal) {
	if (interrupted) return;
	interrupted = signal;
	process.stderr.write(`\n[test] ${signal}: stopping\n`);
	for (const child of runningChildren) child.kill('SIGTERM');
}

if (isMain(import.meta.url)) {
	process.on('SIGINT', () => onSignal('SIGINT'));
	process.on('SIGTERM', () => onSignal('SIGTERM'));
	let fatal = null;
	try {
		await main();
	} catch (error) {
		fatal = error;
	}
	if (fatal) {
		const message = fatal instanceof UserFacingError ? fatal.message : (fatal?.stack ?? String(fatal));
		process.stderr.write(`\n[test] ${message}\n`);
		recordFailure('preparation', message.split('\n')[0]);
	}
	try {
		await cleanup();
	} catch (error) {
		process.stderr.write(`[test] cleanup failed: ${error instanceof Error ? error.message : String(error)}\n`);
	}
	const failed = summary();
	process.exit(interrupted ? (interrupted === 'SIGINT' ? 130 : 143) : failed ? 1 : 0);
}
