#!/usr/bin/env node
/**
 * Brings a fresh Debian machine (Node 20 and npm only) to the point where the product can run:
 * npm dependencies from the lock file, the MariaDB server package and, for the browser tests,
 * Debian's Chromium. Dependency-free on purpose (only `node:` imports): it runs before
 * node_modules exists.
 *
 *   node scripts/prepare.mjs            dependencies + MariaDB
 *   node scripts/prepare.mjs --browser  the same plus Chromium (what `npm test` needs)
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

/** The repository root (the folder above `scripts/`). */
export const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');

const LOCK = join(ROOT, 'package-lock.json');
const NODE_MODULES = join(ROOT, 'node_modules');
/** Where a successful install records the hash of the lock file it installed. */
const LOCK_MARK = join(NODE_MODULES, '.loopledger-lock.sha256');
/** npm's own record of what it installed (written by npm ci and npm install). */
const NPM_HIDDEN_LOCK = join(NODE_MODULES, '.package-lock.json');

/** The MariaDB server binary of Debian's mariadb-server package. */
export const MARIADBD = '/usr/sbin/mariadbd';
/** Debian's Chromium, driven by playwright-core in the browser tests. */
export const CHROMIUM = '/usr/bin/chromium';

/** Prints one line prefixed so the reader knows which step speaks. */
export function say(message) {
	process.stdout.write(`[prepare] ${message}\n`);
}

/** An error that the scripts report as a plain message (no stack trace): the user must act. */
export class UserFacingError extends Error {}

function sha256File(path) {
	return createHash('sha256').update(readFileSync(path)).digest('hex');
}

/**
 * True when npm's hidden lock file in node_modules describes the same packages as
 * package-lock.json: every installed package at the locked version, every non-optional locked
 * package installed. This accepts trees installed by `npm i -E …` in a working copy without
 * forcing a full reinstall.
 */
function npmTreeMatchesLock() {
	if (!existsSync(NPM_HIDDEN_LOCK)) return false;
	let lock;
	let hidden;
	try {
		lock = JSON.parse(readFileSync(LOCK, 'utf8')).packages ?? {};
		hidden = JSON.parse(readFileSync(NPM_HIDDEN_LOCK, 'utf8')).packages ?? {};
	} catch {
		return false;
	}
	for (const [path, entry] of Object.entries(lock)) {
		if (path === '') continue;
		const have = hidden[path];
		if (!have) {
			if (entry.optional) continue;
			return false;
		}
		if (have.version !== entry.version) return false;
	}
	for (const path of Object.keys(hidden)) {
		if (!(path in lock)) return false;
		if (!existsSync(join(ROOT, path, 'package.json'))) return false;
	}
	return true;
}

/** Why node_modules must be (re)installed, or null when it matches package-lock.json. */
export function dependenciesStaleReason() {
	if (!existsSync(NODE_MODULES)) return 'node_modules is missing';
	const want = sha256File(LOCK);
	const have = existsSync(LOCK_MARK) ? readFileSync(LOCK_MARK, 'utf8').trim() : null;
	if (have === want) return null;
	if (npmTreeMatchesLock()) {
		// Installed by hand from this same lock file: record it so the next check is one hash.
		writeFileSync(LOCK_MARK, `${want}\n`);
		return null;
	}
	return have ? 'package-lock.json changed since the last install' : 'node_modules was not installed from package-lock.json';
}

/** Runs a command with inherited output; throws when it fails. */
function runOrThrow(command, args, options = {}) {
	const result = spawnSync(command, args, { stdio: 'inherit', cwd: ROOT, ...options });
	if (result.error) throw new UserFacingError(`${command} could not be run: ${result.error.message}`);
	if (result.status !== 0) {
		throw new UserFacingError(`${[command, ...args].join(' ')} failed (exit ${result.status ?? result.signal})`);
	}
}

/** Installs npm dependencies with `npm ci` when node_modules is missing or stale. */
export function ensureDependencies() {
	const reason = dependenciesStaleReason();
	if (!reason) return false;
	say(`${reason}: running npm ci (about 40 s)`);
	runOrThrow('npm', ['ci', '--no-audit', '--no-fund']);
	writeFileSync(LOCK_MARK, `${sha256File(LOCK)}\n`);
	return true;
}

function isRoot() {
	return typeof process.getuid === 'function' && process.getuid() === 0;
}

function hasCommand(name) {
	return spawnSync('sh', ['-c', `command -v ${name}`], { stdio: 'ignore' }).status === 0;
}

let aptUpdated = false;

/**
 * Installs Debian packages non-interactively (apt-get update first, once per process), as root or
 * through sudo. Throws a message saying what to run by hand when neither is possible.
 */
export function aptInstall(packages, why) {
	const list = packages.join(' ');
	const manual = `apt-get update && apt-get install -y ${list}`;
	let prefix = [];
	if (!isRoot()) {
		if (!hasCommand('sudo')) {
			throw new UserFacingError(
				`${why} needs the Debian package(s) ${list}. Run as root:\n    ${manual}\nthen run this command again.`
			);
		}
		prefix = ['sudo', 'env', 'DEBIAN_FRONTEND=noninteractive'];
	}
	if (!hasCommand('apt-get')) {
		throw new UserFacingError(`${why} needs ${list}, and apt-get is not available here: install it with your package manager.`);
	}
	const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
	const run = (args) => {
		const [cmd, ...rest] = prefix.length ? [...prefix, ...args] : args;
		const result = spawnSync(cmd, rest, { stdio: 'inherit', env });
		if (result.error || result.status !== 0) {
			throw new UserFacingError(
				`Installing ${list} failed (${args.slice(0, 2).join(' ')} exit ${result.status ?? result.error?.message}).\n` +
					`Run as root:\n    ${manual}\nthen run this command again.`
			);
		}
	};
	if (!aptUpdated) {
		say('apt-get update');
		run(['apt-get', 'update']);
		aptUpdated = true;
	}
	say(`apt-get install ${list}`);
	run(['apt-get', 'install', '-y', '-o', 'Dpkg::Options::=--force-confdef', '-o', 'Dpkg::Options::=--force-confold', ...packages]);
}

/** Installs the MariaDB server (and its client) when /usr/sbin/mariadbd is missing. */
export function ensureMariadb() {
	if (existsSync(MARIADBD) && hasCommand('mariadb-install-db') && hasCommand('mariadb')) return false;
	say(`${MARIADBD} not found: installing mariadb-server (about 20 s)`);
	aptInstall(['mariadb-server', 'mariadb-client'], 'The private database');
	if (!existsSync(MARIADBD)) throw new UserFacingError(`mariadb-server was installed but ${MARIADBD} is still missing.`);
	return true;
}

/** Installs Debian's Chromium (for the browser tests) when /usr/bin/chromium is missing. */
export function ensureChromium() {
	if (existsSync(CHROMIUM)) return false;
	say(`${CHROMIUM} not found: installing chromium (about a minute)`);
	aptInstall(['chromium'], 'The browser tests');
	if (!existsSync(CHROMIUM)) throw new UserFacingError(`chromium was installed but ${CHROMIUM} is still missing.`);
	return true;
}

/**
 * Everything `npm start` (and, with `browser: true`, `npm test`) needs before it can run:
 * npm dependencies, the MariaDB server and optionally Chromium.
 */
export function prepare({ browser = false } = {}) {
	ensureMariadb();
	if (browser) ensureChromium();
	ensureDependencies();
}

/** True when the given module URL is the script node was started with. */
export function isMain(moduleUrl) {
	return Boolean(process.argv[1]) && moduleUrl === pathToFileURL(resolve(process.argv[1])).href;
}

if (isMain(import.meta.url)) {
	try {
		prepare({ browser: process.argv.includes('--browser') });
		say('ready');
	} catch (error) {
		process.stderr.write(`[prepare] ${error instanceof Error ? error.message : String(error)}\n`);
		process.exit(1);
	}
}
