#!/usr/bin/env node
/**
 * The private MariaDB server of this working copy. Dependency-free (only `node:` imports).
 *
 *   node scripts/db.mjs start               initialise .data/mariadb once, start, create databases and the app user
 *   node scripts/db.mjs stop                stop the server this working copy started (by pid file) and wait
 *   node scripts/db.mjs status              running or not, pid, port, socket
 *   node scripts/db.mjs create-db <name>    create a database and grant the app user all on it
 *   node scripts/db.mjs create-db <name> --fresh   drop it first (only names ending in _test)
 *   node scripts/db.mjs env                 print `export DB_…=…` lines for a shell (eval "$(…)")
 *
 * Layout under .data/ (git-ignored): mariadb/ (data), mariadb.sock, mariadb.pid, mariadb.log,
 * mariadb.port (the port the running server listens on), db-password (mode 600), db.lock.
 * Root is used only over the private socket for admin work; the app connects as DB_USER over TCP.
 */
import { spawn, spawnSync } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import {
	chmodSync,
	closeSync,
	existsSync,
	mkdirSync,
	openSync,
	readFileSync,
	rmSync,
	statSync,
	writeFileSync
} from 'node:fs';
import { createConnection } from 'node:net';
import { join } from 'node:path';
import { ROOT, MARIADBD, UserFacingError, ensureMariadb, isMain } from './prepare.mjs';

/** The git-ignored folder holding the server's data, socket, pid, log and generated secrets. */
export const DATA_DIR = join(ROOT, '.data');
const DATADIR = join(DATA_DIR, 'mariadb');
/** The private server's unix socket (root admin work only). */
export const SOCKET = join(DATA_DIR, 'mariadb.sock');
const PID_FILE = join(DATA_DIR, 'mariadb.pid');
const LOG_FILE = join(DATA_DIR, 'mariadb.log');
const PORT_FILE = join(DATA_DIR, 'mariadb.port');
const PASSWORD_FILE = join(DATA_DIR, 'db-password');
const LOCK_DIR = join(DATA_DIR, 'db.lock');

/** The app's database, created by every start. */
export const APP_DATABASE = 'loopledger';
/** The tests' database, created by every start and recreated empty by `npm test`. */
export const TEST_DATABASE = 'loopledger_test';
/** TCP port of the private server on 127.0.0.1 when DB_PORT is not set. */
export const DEFAULT_DB_PORT = 3307;

const NAME_RE = /^[A-Za-z0-9_]{1,64}$/;
const USER_RE = /^[A-Za-z0-9_]{1,32}$/;

/** Prints one line prefixed with the step name. */
function say(message) {
	process.stdout.write(`[db] ${message}\n`);
}

const sleep = (ms) => new Promise((r) => setTimeout(r, ms));

/** The port requested through DB_PORT (validated), or the default 3307. */
export function requestedPort(env = process.env) {
	if (env.DB_PORT === undefined || env.DB_PORT === '') return DEFAULT_DB_PORT;
	const port = Number(env.DB_PORT);
	if (!Number.isInteger(port) || port < 1 || port > 65535) {
		throw new UserFacingError(`DB_PORT must be a whole number from 1 to 65535 (got "${env.DB_PORT}").`);
	}
	return port;
}

/** The application user name (DB_USER, default `loopledger`), validated. */
export function appUser(env = process.env) {
	const user = env.DB_USER || 'loopledger';
	if (!USER_RE.test(user)) throw new UserFacingError(`DB_USER must be 1–32 letters, digits or _ (got "${user}").`);
	return user;
}

/**
 * The application password: DB_PASSWORD when set, else a random one generated once and kept in
 * .data/db-password (mode 600).
 */
export function appPassword(env = process.env) {
	if (env.DB_PASSWORD) return env.DB_PASSWORD;
	if (existsSync(PASSWORD_FILE)) {
		const stored = readFileSync(PASSWORD_FILE, 'utf8').trim();
		if (stored) return stored;
	}
	mkdirSync(DATA_DIR, { recursive: true });
	const fresh = randomBytes(24).toString('base64url');
	writeFileSync(PASSWORD_FILE, `${fresh}\n`, { mode: 0o600 });
	chmodSync(PASSWORD_FILE, 0o600);
	return fresh;
}

function sqlString(value) {
	return `'${String(value).replace(/\\/g, '\\\\').replace(/'/g, "\\'")}'`;
}

function shellQuote(value) {
	return `'${String(value).replace(/'/g, `'\\''`)}'`;
}

function checkName(name) {
	if (!NAME_RE.test(name ?? '')) {
		throw new UserFacingError(`Database name must be 1–64 letters, digits or _ (got "${name ?? ''}").`);
	}
	return name;
}

/** Escapes `_` and `%` so a GRANT names exactly one database. */
function grantPattern(name) {
	return name.replace(/[_%]/g, (c) => `\\${c}`);
}

/** Runs SQL as root over the private socket; returns stdout (tab-separated, no headers). */
export function rootSql(sql) {
	const result = spawnSync(
		'mariadb',
		['--no-defaults', '--protocol=socket', `--socket=${SOCKET}`, '-uroot', '--batch', '--skip-column-names', '-e', sql],
		{ encoding: 'utf8' }
	);
	if (result.error) throw new UserFacingError(`mariadb client could not be run: ${result.error.message}`);
	if (result.status !== 0) throw new Error(`SQL failed: ${result.stderr.trim()}`);
	return result.stdout;
}

/** State of /proc/<pid>: null when there is no such process or it is a zombie. */
function processInfo(pid) {
	try {
		const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
		const state = stat.slice(stat.lastIndexOf(')') + 2, stat.lastIndexOf(')') + 3);
		if (state === 'Z' || state === 'X') return null;
		const cmdline = readFileSync(`/proc/${pid}/cmdline`, 'utf8').split('\0');
		return { cmdline };
	} catch {
		return null;
	}
}

/** True when pid is a live mariadbd serving this working copy's data folder. */
function isOurServer(pid) {
	const info = processInfo(pid);
	if (!info) return false;
	return info.cmdline.some((a) => a.endsWith('mariadbd')) && info.cmdline.includes(`--datadir=${DATADIR}`);
}

function readPid() {
	if (!existsSync(PID_FILE)) return null;
	const pid = Number(readFileSync(PID_FILE, 'utf8').trim());
	return Number.isInteger(pid) && pid > 0 ? pid : null;
}

/**
 * Whether this working copy's server runs: `{ running, pid, port, socket }`. A pid file left by a
 * crash (no such process, or another program under that pid) counts as not running.
 */
export function status() {
	const pid = readPid();
	const running = pid !== null && isOurServer(pid);
	const port = existsSync(PORT_FILE) ? Number(readFileSync(PORT_FILE, 'utf8').trim()) : null;
	return { running, pid: running ? pid : null, stalePid: !running && pid !== null ? pid : null, port: running ? port : null, socket: SOCKET };
}

/** True when something accepts TCP connections on 127.0.0.1:port. */
export function portInUse(port) {
	return new Promise((resolvePromise) => {
		const socket = createConnection({ host: '127.0.0.1', port });
		const done = (busy) => {
			socket.destroy();
			resolvePromise(busy);
		};
		socket.setTimeout(1000, () => done(true));
		socket.once('connect', () => done(true));
		socket.once('error', () => done(false));
	});
}

/** Resolves once the server greets on the unix socket (the MariaDB handshake arrives). */
function socketAnswers() {
	return new Promise((resolvePromise) => {
		if (!existsSync(SOCKET)) return resolvePromise(false);
		const socket = createConnection({ path: SOCKET });
		const done = (ok) => {
			socket.destroy();
			resolvePromise(ok);
		};
		socket.setTimeout(1000, () => done(false));
		socket.once('data', () => done(true));
		socket.once('error', () => done(false));
	});
}

function logTail(lines = 25) {
	if (!existsSync(LOG_FILE)) return '(no log)';
	return readFileSync(LOG_FILE, 'utf8').trimEnd().split('\n').slice(-lines).join('\n');
}

/** A lock folder so two starts in the same working copy do not race; stale locks are taken over. */
async function withLock(fn) {
	mkdirSync(DATA_DIR, { recursive: true });
	const deadline = Date.now() + 120_000;
	for (;;) {
		try {
			mkdirSync(LOCK_DIR);
			writeFileSync(join(LOCK_DIR, 'pid'), String(process.pid));
			break;
		} catch (error) {
			if (error.code !== 'EEXIST') throw error;
			let holder = null;
			try {
				holder = Number(readFileSync(join(LOCK_DIR, 'pid'), 'utf8'));
			} catch {
				holder = null;
			}
			const age = Date.now() - statSync(LOCK_DIR).mtimeMs;
			if ((holder && !processInfo(holder)) || (!holder && age > 5000)) {
				rmSync(LOCK_DIR, { recursive: true, force: true });
				continue;
			}
			if (Date.now() > deadline) throw new UserFacingError(`Another database command holds ${LOCK_DIR} (pid ${holder}).`);
			await sleep(200);
		}
	}
	try {
		return await fn();
	} finally {
		rmSync(LOCK_DIR, { recursive: true, force: true });
	}
}

function initialiseDataFolder() {
	if (existsSync(join(DATADIR, 'mysql'))) return false;
	say(`initialising ${DATADIR}`);
	rmSync(DATADIR, { recursive: true, force: true });
	mkdirSync(DATADIR, { recursive: true });
	const args = ['--no-defaults', `--datadir=${DATADIR}`, '--auth-root-authentication-method=normal'];
	if (process.getuid?.() === 0) args.push('--user=root');
	const result = spawnSync('mariadb-install-db', args, { encoding: 'utf8' });
	if (result.status !== 0) {
		rmSync(DATADIR, { recursive: true, force: true });
		throw new UserFacingError(`mariadb-install-db failed:\n${result.stdout}\n${result.stderr}`);
	}
	return true;
}

async function launch(port) {
	rmSync(SOCKET, { force: true });
	rmSync(PID_FILE, { force: true });
	const args = [
		'--no-defaults',
		`--datadir=${DATADIR}`,
		`--socket=${SOCKET}`,
		`--pid-file=${PID_FILE}`,
		`--port=${port}`,
		'--bind-address=127.0.0.1',
		'--skip-log-bin',
		'--skip-name-resolve',
		'--character-set-server=utf8mb4',
		'--collation-server=utf8mb4_unicode_ci',
		'--innodb-buffer-pool-size=64M'
	];
	if (process.getuid?.() === 0) args.push('--user=root');
	const log = openSync(LOG_FILE, 'a');
	writeFileSync(LOG_FILE, `\n--- start ${new Date().toISOString()} port ${port}\n`, { flag: 'a' });
	const child = spawn(MARIADBD, args, { detached: true, stdio: ['ignore', log, log] });
	closeSync(log);
	let exited = null;
	child.once('exit', (code, signal) => {
		exited = code ?? signal;
	});
	child.unref();
	const deadline = Date.now() + 60_000;
	while (Date.now() < deadline) {
		if (exited !== null) {
			throw new UserFacingError(`mariadbd exited (${exited}) while starting. Last lines of ${LOG_FILE}:\n${logTail()}`);
		}
		if (await socketAnswers()) {
			writeFileSync(PORT_FILE, `${port}\n`);
			return child.pid;
		}
		await sleep(150);
	}
	throw new UserFacingError(`mariadbd did not answer within 60 s. Last lines of ${LOG_FILE}:\n${logTail()}`);
}

/** Removes the accounts a fresh data folder has that this setup never uses (anonymous, remote root). */
function hardenAccounts() {
	const rows = rootSql("SELECT user, host FROM mysql.user WHERE user = '' OR (user = 'root' AND host <> 'localhost')");
	const drops = rows
		.split('\n')
		.filter(Boolean)
		.map((line) => {
			const [user, host] = line.split('\t');
			return `DROP USER IF EXISTS ${sqlString(user)}@${sqlString(host)};`;
		});
	rootSql(`${drops.join(' ')} DROP DATABASE IF EXISTS test;`);
}

/** Creates (if needed) the app user with the current password and grants it the app databases. */
function ensureAppUser(env, databases) {
	const user = appUser(env);
	const password = appPassword(env);
	const statements = [];
	for (const host of ['localhost', '127.0.0.1']) {
		const who = `${sqlString(user)}@${sqlString(host)}`;
		statements.push(`CREATE USER IF NOT EXISTS ${who} IDENTIFIED BY ${sqlString(password)};`);
		statements.push(`ALTER USER ${who} IDENTIFIED BY ${sqlString(password)};`);
		for (const db of databases) statements.push(`GRANT ALL PRIVILEGES ON \`${grantPattern(db)}\`.* TO ${who};`);
	}
	rootSql(statements.join(' '));
}

function createDatabaseSql(name) {
	return `CREATE DATABASE IF NOT EXISTS \`${checkName(name)}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;`;
}

/**
 * Starts the private server if it is not running (initialising the data folder the first time),
 * then makes sure the databases and the app user exist. Returns the connection settings the app
 * needs: `{ port, user, password, socket, startedNow }`. With `fallbackPort`, a busy default
 * port (another program) is replaced by a free one instead of failing.
 */
export async function start({ env = process.env, fallbackPort = false, quiet = false } = {}) {
	ensureMariadb();
	const log = quiet ? () => {} : say;
	return withLock(async () => {
		const current = status();
		let port;
		let startedNow = false;
		if (current.running) {
			port = current.port ?? requestedPort(env);
			log(`already running (pid ${current.pid}, port ${port})`);
			if (env.DB_PORT && Number(env.DB_PORT) !== port) {
				log(`note: DB_PORT=${env.DB_PORT} asked for, but the running server listens on ${port}; using ${port}`);
			}
		} else {
			if (current.stalePid) log(`removing stale pid file (process ${current.stalePid} is not this working copy's mariadbd)`);
			port = requestedPort(env);
			if (await portInUse(port)) {
				const explicit = Boolean(env.DB_PORT);
				if (!fallbackPort || explicit) {
					throw new UserFacingError(
						`Port ${port} on 127.0.0.1 is taken by another program. Stop it, or choose another port: DB_PORT=3317 npm …`
					);
				}
				port = await freePort(port + 10);
				log(`port ${requestedPort(env)} is taken by another program; using ${port}`);
			}
			const fresh = initialiseDataFolder();
			const pid = await launch(port);
			startedNow = true;
			log(`started mariadbd (pid ${pid}) on 127.0.0.1:${port}, socket ${SOCKET}`);
			if (fresh) hardenAccounts();
		}
		const databases = [...new Set([APP_DATABASE, TEST_DATABASE, env.DB_NAME || APP_DATABASE])].map(checkName);
		rootSql(databases.map(createDatabaseSql).join(' '));
		ensureAppUser(env, databases);
		return { port, user: appUser(env), password: appPassword(env), socket: SOCKET, startedNow };
	});
}

/** Stops this working copy's server (by pid file, never by name) and waits until it is gone. */
export async function stop({ quiet = false } = {}) {
	const log = quiet ? () => {} : say;
	const current = status();
	if (!current.running) {
		if (current.stalePid) {
			rmSync(PID_FILE, { force: true });
			log(`not running (removed stale pid file of process ${current.stalePid})`);
		} else log('not running');
		return false;
	}
	const pid = current.pid;
	log(`stopping mariadbd (pid ${pid})`);
	process.kill(pid, 'SIGTERM');
	const deadline = Date.now() + 120_000;
	while (isOurServer(pid)) {
		if (Date.now() > deadline) {
			throw new UserFacingError(`mariadbd (pid ${pid}) is still shutting down after 120 s; see ${LOG_FILE}.`);
		}
		await sleep(100);
	}
	rmSync(PORT_FILE, { force: true });
	log('stopped');
	return true;
}

/**
 * Creates a database and grants the app user everything on it. With `fresh`, drops it first —
 * allowed only for names ending in `_test`, so real data is never dropped by this command.
 */
export function createDatabase(name, { fresh = false, env = process.env } = {}) {
	checkName(name);
	if (!status().running) throw new UserFacingError('The database server is not running: npm run db:start');
	if (fresh && !name.endsWith('_test')) {
		throw new UserFacingError(`Refusing to drop "${name}": only databases whose name ends in _test may be recreated.`);
	}
	rootSql(`${fresh ? `DROP DATABASE IF EXISTS \`${name}\`; ` : ''}${createDatabaseSql(name)}`);
	ensureAppUser(env, [...new Set([APP_DATABASE, TEST_DATABASE, name])]);
}

/**
 * Fills DB_PORT and DB_PASSWORD in `env` from this working copy's running server and its stored
 * password when they are not set, so `npm run migrate`, `npm run seed` and manual test runs reach
 * the private server without extra typing. Never overrides a value that is set.
 */
export function applyLocalDatabaseEnv(env = process.env) {
	const s = status();
	if (!env.DB_PORT && s.running && s.port) env.DB_PORT = String(s.port);
	if (!env.DB_PASSWORD && existsSync(PASSWORD_FILE)) env.DB_PASSWORD = readFileSync(PASSWORD_FILE, 'utf8').trim();
	if (!env.DB_HOST) env.DB_HOST = '127.0.0.1';
	return env;
}

/** A free TCP port on 127.0.0.1 at or above `from`. */
export async function freePort(from) {
	for (let port = from; port < from + 200; port++) {
		if (!(await portInUse(port))) return port;
	}
	throw new UserFacingError(`No free port found from ${from} to ${from + 199}.`);
}

async function main(argv) {
	const [command, ...rest] = argv;
	switch (command) {
		case 'start': {
			const info = await start();
			say(`ready: 127.0.0.1:${info.port}, user ${info.user}, databases ${APP_DATABASE}, ${TEST_DATABASE}`);
			break;
		}
		case 'stop':
			await stop();
			break;
		case 'status': {
			const s = status();
			if (s.running) say(`running (pid ${s.pid}) on 127.0.0.1:${s.port}, socket ${s.socket}, data ${DATADIR}`);
			else say(`not running${s.stalePid ? ` (stale pid file of process ${s.stalePid})` : ''}`);
			process.exitCode = s.running ? 0 : 3;
			break;
		}
		case 'create-db': {
			const name = rest.find((a) => !a.startsWith('--'));
			if (!name) throw new UserFacingError('Usage: node scripts/db.mjs create-db <name> [--fresh]');
			createDatabase(name, { fresh: rest.includes('--fresh') });
			say(`database ${name} ready${rest.includes('--fresh') ? ' (recreated empty)' : ''}`);
			break;
		}
		case 'env': {
			const s = status();
			if (!s.running) throw new UserFacingError('The database server is not running: npm run db:start');
			const lines = {
				DB_HOST: '127.0.0.1',
				DB_PORT: String(s.port),
				DB_USER: appUser(),
				DB_PASSWORD: appPassword()
			};
			for (const [k, v] of Object.entries(lines)) process.stdout.write(`export ${k}=${shellQuote(v)}\n`);
			break;
		}
		default:
			throw new UserFacingError('Usage: node scripts/db.mjs start|stop|status|create-db <name> [--fresh]|env');
	}
}

if (isMain(import.meta.url)) {
	main(process.argv.slice(2)).catch((error) => {
		const message = error instanceof UserFacingError ? error.message : (error?.stack ?? String(error));
		process.stderr.write(`[db] ${message}\n`);
		process.exit(1);
	});
}
