/**
 * Project-local PostgreSQL clusters: the developer's cluster under `.data/` and throwaway clusters for tests.
 *
 * Layout of a cluster rooted at `baseDir` (see {@link clusterPaths}):
 *   baseDir/postgres          the data directory (initdb; mode 700, owned by the `postgres` OS user when run as root)
 *   baseDir/run               the Unix socket directory (same owner and mode)
 *   baseDir/postgres.log      the server log (pg_ctl -l)
 *   baseDir/db-secrets.json   generated passwords and the cluster's port (mode 600, owned by the caller)
 *
 * The server listens on 127.0.0.1 only and every connection needs a password (scram-sha-256; no `trust` rule).
 * Two database roles are created: the owner role (owns the database, runs migrations) and the app role (plain DML
 * through default privileges; no superuser, createdb or createrole).
 *
 * Port: the port is recorded in db-secrets.json when the cluster is first created and that recorded port is used on
 * every later start, whatever `opts.port` says (so URLs kept in a developer's shell or .env stay valid); a running
 * server's actual port (postmaster.pid) always wins. `resetCluster` starts over on `opts.port`.
 *
 * PostgreSQL refuses to run as root: as root, initdb and pg_ctl run as the `postgres` OS user through `runuser`,
 * which then needs to traverse every parent of baseDir (o+x). Otherwise they run as the current user.
 */
import { execFile } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import { constants as fsConstants } from 'node:fs';
import { access, chmod, chown, mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import { createRequire } from 'node:module';
import { createServer } from 'node:net';
import { delimiter, join } from 'node:path';

export interface ClusterOptions {
	/** Absolute directory holding the cluster (data dir, socket dir, log and secrets; see the module comment). */
	baseDir: string;
	/** TCP port on 127.0.0.1, used when the cluster is created; an existing cluster keeps its recorded port. */
	port: number;
	/** Database to create, owned by the owner role, e.g. 'benchstamp'. */
	database: string;
	/** Progress messages; silent when omitted. */
	log?: (msg: string) => void;
	/**
	 * Throwaway cluster: start with fsync, synchronous_commit and full_page_writes off (faster tests; data may be
	 * lost on a machine crash). Never for the developer's cluster.
	 */
	ephemeral?: boolean;
}

export interface ClusterUrls {
	ownerUrl: string;
	appUrl: string;
	ownerRole: string;
	appRole: string;
	port: number;
	/** Superuser (`postgres`) URL for tooling and tests only; never hand it to the app. */
	superuserUrl: string;
}

export interface ClusterPaths {
	baseDir: string;
	dataDir: string;
	runDir: string;
	logFile: string;
	secretsFile: string;
}

export interface ClusterStatus {
	initialised: boolean;
	running: boolean;
	/** The running server's port, else the recorded one (if any). */
	port?: number;
}

export const OWNER_ROLE = 'benchstamp_owner';
export const APP_ROLE = 'benchstamp_app';
export const SUPERUSER = 'postgres';
const HOST = '127.0.0.1';
const PG_OS_USER = 'postgres';

interface Secrets {
	version: 1;
	port: number;
	superuserPassword: string;
	ownerPassword: string;
	appPassword: string;
	/** Databases whose roles, ownership and grants are in place (so a second start can skip the SQL). */
	provisioned: string[];
}

type Log = (msg: string) => void;
const silent: Log = () => {};

export function clusterPaths(baseDir: string): ClusterPaths {
	return {
		baseDir,
		dataDir: join(baseDir, 'postgres'),
		runDir: join(baseDir, 'run'),
		logFile: join(baseDir, 'postgres.log'),
		secretsFile: join(baseDir, 'db-secrets.json')
	};
}

// ---------------------------------------------------------------------------------------------------------------
// Minimal typing of the `pg` package (no @types/pg in this project).

export interface PgQueryResult<R> {
	rows: R[];
	rowCount: number | null;
}
export interface PgClient {
	connect(): Promise<void>;
	query<R = Record<string, unknown>>(text: string, values?: unknown[]): Promise<PgQueryResult<R>>;
	end(): Promise<void>;
	on(event: 'error', listener: (err: Error) => void): unknown;
}
interface PgClientConfig {
	connectionString?: string;
	host?: string;
	port?: number;
	user?: string;
	password?: string;
	database?: string;
	connectionTimeoutMillis?: number;
}
interface PgModule {
	Client: new (config: PgClientConfig) => PgClient;
}

function loadPg(): PgModule {
	const require = createRequire(import.meta.url);
	return require('pg') as PgModule;
}

/** Opens a `pg` client on a URL (connected; the caller must `end()` it). */
export async function connectClient(url: string): Promise<PgClient> {
	const { Client } = loadPg();
	const client = new Client({ connectionString: url, connectionTimeoutMillis: 10_000 });
	client.on('error', () => {}); // a dropped idle connection must not crash the process
	await client.connect();
	return client;
}

/** Runs `fn` with a connected client and always closes it. */
export async function withClient<T>(url: string, fn: (client: PgClient) => Promise<T>): Promise<T> {
	const client = await connectClient(url);
	try {
		return await fn(client);
	} finally {
		await client.end().catch(() => {});
	}
}

// ---------------------------------------------------------------------------------------------------------------
// Processes

interface RunResult {
	code: number;
	stdout: string;
	stderr: string;
}

function run(cmd: string, args: string[], env?: NodeJS.ProcessEnv): Promise<RunResult> {
	return new Promise((resolve, reject) => {
		execFile(
			cmd,
			args,
			{ cwd: '/', env: { ...process.env, ...env }, maxBuffer: 16 * 1024 * 1024 },
			(error, stdout, stderr) => {
				if (error && typeof error.code !== 'number') {
					reject(new Error(`cannot run ${cmd}: ${error.message}`));
					return;
				}
				resolve({ code: error ? Number(error.code) : 0, stdout: String(stdout), stderr: String(stderr) });
			}
		);
	});
}

async function runOk(cmd: string, args: string[], env?: NodeJS.ProcessEnv): Promise<RunResult> {
	const result = await run(cmd, args, env);
	if (result.code !== 0) {
		const output = `${result.stderr}${result.stdout}`.trim();
		throw new Error(`${cmd} ${args.join(' ')} failed (exit ${result.code})${output ? `:\n${output}` : ''}`);
	}
	return result;
}

function isRoot(): boolean {
	return typeof process.getuid === 'function' && process.getuid() === 0;
}

async function exists(path: string): Promise<boolean> {
	try {
		await access(path, fsConstants.F_OK);
		return true;
	} catch {
		return false;
	}
}

async function isExecutable(path: string): Promise<boolean> {
	try {
		await access(path, fsConstants.X_OK);
		return (await stat(path)).isFile();
	} catch {
		return false;
	}
}

let runuserPath: string | undefined;
async function runuser(): Promise<string> {
	if (runuserPath) return runuserPath;
	for (const candidate of ['/usr/sbin/runuser', '/sbin/runuser', '/usr/bin/runuser', '/bin/runuser']) {
		if (await isExecutable(candidate)) return (runuserPath = candidate);
	}
	return (runuserPath = 'runuser');
}

/** Runs a PostgreSQL program as the `postgres` OS user when we are root, else as ourselves. */
async function runPg(binDir: string, program: string, args: string[]): Promise<RunResult> {
	const exe = join(binDir, program);
	const env = { LC_ALL: 'C.UTF-8', LANG: 'C.UTF-8' };
	if (isRoot()) return run(await runuser(), ['-u', PG_OS_USER, '--', exe, ...args], env);
	return run(exe, args, env);
}

async function runPgOk(binDir: string, program: string, args: string[]): Promise<RunResult> {
	const result = await runPg(binDir, program, args);
	if (result.code !== 0) {
		const output = `${result.stderr}${result.stdout}`.trim();
		throw new Error(`${program} ${args.join(' ')} failed (exit ${result.code})${output ? `:\n${output}` : ''}`);
	}
	return result;
}

interface OsUser {
	uid: number;
	gid: number;
}
let pgOsUser: OsUser | undefined;
async function postgresOsUser(): Promise<OsUser> {
	if (pgOsUser) return pgOsUser;
	const uid = await run('id', ['-u', PG_OS_USER]);
	const gid = await run('id', ['-g', PG_OS_USER]);
	if (uid.code !== 0 || gid.code !== 0) {
		throw new Error(
			`running as root, PostgreSQL must run as the "${PG_OS_USER}" OS user, which does not exist ` +
				`(installing the Debian package creates it: apt-get install -y postgresql)`
		);
	}
	return (pgOsUser = { uid: Number(uid.stdout.trim()), gid: Number(gid.stdout.trim()) });
}

// ---------------------------------------------------------------------------------------------------------------
// Installation

async function hasPgPrograms(dir: string): Promise<boolean> {
	return (
		(await isExecutable(join(dir, 'pg_ctl'))) &&
		(await isExecutable(join(dir, 'initdb'))) &&
		(await isExecutable(join(dir, 'postgres')))
	);
}

/**
 * The directory holding initdb/pg_ctl/postgres: `PG_BIN` if set (and valid), else the newest
 * `/usr/lib/postgresql/<major>/bin` (Debian/Ubuntu), else `/usr/local/pgsql/bin`, else a PATH entry with them.
 */
export async function findPostgresBin(): Promise<string | undefined> {
	const fromEnv = process.env.PG_BIN;
	if (fromEnv) {
		if (await hasPgPrograms(fromEnv)) return fromEnv;
		throw new Error(`PG_BIN=${fromEnv} does not contain initdb, pg_ctl and postgres`);
	}
	const debianRoot = '/usr/lib/postgresql';
	let versions: string[] = [];
	try {
		versions = (await readdir(debianRoot)).filter((v) => /^\d+(\.\d+)?$/.test(v));
	} catch {
		// not a Debian-style layout
	}
	versions.sort((a, b) => Number(b) - Number(a));
	for (const version of versions) {
		const dir = join(debianRoot, version, 'bin');
		if (await hasPgPrograms(dir)) return dir;
	}
	const candidates = ['/usr/local/pgsql/bin', ...(process.env.PATH ?? '').split(delimiter).filter(Boolean)];
	for (const dir of candidates) {
		if (await hasPgPrograms(dir)) return dir;
	}
	return undefined;
}

export const INSTALL_COMMAND = 'sudo apt-get install -y postgresql';

/**
 * Returns the PostgreSQL bin directory, installing the distribution package first when it is missing and we are
 * root (`apt-get update && apt-get install -y postgresql`, non-interactive). When missing and not root, throws an
 * Error whose message is exactly the command to run ({@link INSTALL_COMMAND}).
 *
 * Note: Debian's package creates and may start its own cluster `15/main` on port 5432; it is left alone.
 */
export async function ensurePostgresInstalled(log: Log = silent): Promise<string> {
	const found = await findPostgresBin();
	if (found) return found;
	if (!isRoot()) throw new Error(INSTALL_COMMAND);
	if (!(await isExecutable('/usr/bin/apt-get'))) {
		throw new Error('PostgreSQL is not installed and this machine has no apt-get: install PostgreSQL, or set PG_BIN');
	}
	const env = { DEBIAN_FRONTEND: 'noninteractive' };
	log('PostgreSQL is not installed: apt-get update');
	await runOk('/usr/bin/apt-get', ['update'], env);
	log('apt-get install -y postgresql');
	await runOk('/usr/bin/apt-get', ['install', '-y', '--no-install-recommends', 'postgresql'], env);
	const bin = await findPostgresBin();
	if (!bin) throw new Error('apt-get installed postgresql but no initdb/pg_ctl was found under /usr/lib/postgresql');
	log(`PostgreSQL installed in ${bin}`);
	return bin;
}

// ---------------------------------------------------------------------------------------------------------------
// Secrets

function generatePassword(): string {
	return randomBytes(24).toString('base64url');
}

function isSecrets(value: unknown): value is Secrets {
	if (typeof value !== 'object' || value === null) return false;
	const v = value as Record<string, unknown>;
	return (
		v.version === 1 &&
		typeof v.port === 'number' &&
		typeof v.superuserPassword === 'string' &&
		typeof v.ownerPassword === 'string' &&
		typeof v.appPassword === 'string' &&
		Array.isArray(v.provisioned) &&
		v.provisioned.every((d) => typeof d === 'string')
	);
}

async function readSecrets(file: string): Promise<Secrets | undefined> {
	let text: string;
	try {
		text = await readFile(file, 'utf8');
	} catch {
		return undefined;
	}
	let parsed: unknown;
	try {
		parsed = JSON.parse(text);
	} catch {
		throw new Error(`${file} is not valid JSON; fix it or reset the cluster`);
	}
	if (!isSecrets(parsed)) throw new Error(`${file} has an unexpected shape; fix it or reset the cluster`);
	return parsed;
}

async function writeSecrets(file: string, secrets: Secrets): Promise<void> {
	const tmp = `${file}.${process.pid}.tmp`;
	await writeFile(tmp, `${JSON.stringify(secrets, null, '\t')}\n`, { mode: 0o600 });
	await chmod(tmp, 0o600);
	await rename(tmp, file);
}

// ---------------------------------------------------------------------------------------------------------------
// Cluster state

async function isInitialised(paths: ClusterPaths): Promise<boolean> {
	return exists(join(paths.dataDir, 'PG_VERSION'));
}

/** Port written by the running postmaster (line 4 of postmaster.pid). */
async function postmasterPort(paths: ClusterPaths): Promise<number | undefined> {
	try {
		const lines = (await readFile(join(paths.dataDir, 'postmaster.pid'), 'utf8')).split('\n');
		const port = Number(lines[3]);
		return Number.isInteger(port) && port > 0 ? port : undefined;
	} catch {
		return undefined;
	}
}

async function isRunning(binDir: string, paths: ClusterPaths): Promise<boolean> {
	if (!(await isInitialised(paths))) return false;
	// pg_ctl status: 0 running, 3 not running, 4 no accessible data directory.
	const result = await runPg(binDir, 'pg_ctl', ['status', '-D', paths.dataDir]);
	return result.code === 0;
}

export async function clusterStatus(baseDir: string): Promise<ClusterStatus> {
	const paths = clusterPaths(baseDir);
	const initialised = await isInitialised(paths);
	const secrets = await readSecrets(paths.secretsFile).catch(() => undefined);
	if (!initialised) return { initialised, running: false, port: secrets?.port };
	const binDir = await findPostgresBin();
	const running = binDir ? await isRunning(binDir, paths) : false;
	const port = (running ? await postmasterPort(paths) : undefined) ?? secrets?.port;
	return { initialised, running, port };
}

function buildUrls(secrets: Secrets, port: number, database: string): ClusterUrls {
	const url = (role: string, password: string) =>
		`postgres://${role}:${encodeURIComponent(password)}@${HOST}:${port}/${database}`;
	return {
		ownerUrl: url(OWNER_ROLE, secrets.ownerPassword),
		appUrl: url(APP_ROLE, secrets.appPassword),
		ownerRole: OWNER_ROLE,
		appRole: APP_ROLE,
		port,
		superuserUrl: url(SUPERUSER, secrets.superuserPassword)
	};
}

/**
 * The URLs of an existing cluster from its secrets (running server's port, else the recorded one), without
 * starting anything; undefined if the cluster was never started.
 */
export async function clusterUrls(baseDir: string, database: string): Promise<ClusterUrls | undefined> {
	assertDatabaseName(database);
	const paths = clusterPaths(baseDir);
	const secrets = await readSecrets(paths.secretsFile);
	if (!secrets) return undefined;
	return buildUrls(secrets, (await postmasterPort(paths)) ?? secrets.port, database);
}

function assertDatabaseName(database: string): void {
	if (!/^[a-z_][a-z0-9_]{0,62}$/.test(database)) {
		throw new Error(`database name "${database}" must match [a-z_][a-z0-9_]* (at most 63 characters)`);
	}
}

function assertSafePath(path: string): void {
	if (!path.startsWith('/')) throw new Error(`cluster directory must be absolute: ${path}`);
	// pg_ctl passes -o and -l through /bin/sh; keep quoting trivial.
	if (/['"`$\\\n\r]/.test(path))
		throw new Error(`cluster directory must not contain quotes, $, \\ or newlines: ${path}`);
}

function assertPort(port: number): void {
	if (!Number.isInteger(port) || port < 1 || port > 65535) throw new Error(`invalid port: ${port}`);
}

/** Creates baseDir, the data/socket directories and the log file with the ownership PostgreSQL needs. */
async function prepareDirectories(paths: ClusterPaths): Promise<void> {
	await mkdir(paths.baseDir, { recursive: true });
	await mkdir(paths.dataDir, { recursive: true, mode: 0o700 });
	await mkdir(paths.runDir, { recursive: true, mode: 0o700 });
	if (!(await exists(paths.logFile))) await writeFile(paths.logFile, '', { mode: 0o640 });
	if (isRoot()) {
		const { uid, gid } = await postgresOsUser();
		for (const path of [paths.dataDir, paths.runDir, paths.logFile]) await chown(path, uid, gid);
		// Fails when a parent directory (e.g. a 700 mkdtemp directory or /root) is not traversable by postgres.
		const check = await run(await runuser(), [
			'-u',
			PG_OS_USER,
			'--',
			'test',
			'-w',
			paths.runDir,
			'-a',
			'-w',
			paths.logFile
		]);
		if (check.code !== 0) {
			throw new Error(
				`the "${PG_OS_USER}" OS user cannot reach ${paths.baseDir}: every parent directory needs o+x ` +
					`(e.g. chmod o+x on it), or choose another directory`
			);
		}
	}
	await chmod(paths.dataDir, 0o700);
	await chmod(paths.runDir, 0o700);
}

async function initdb(binDir: string, paths: ClusterPaths, superuserPassword: string, log: Log): Promise<void> {
	log(`initdb ${paths.dataDir}`);
	const pwfile = join(paths.runDir, 'initdb.pw');
	await writeFile(pwfile, `${superuserPassword}\n`, { mode: 0o600 });
	try {
		if (isRoot()) {
			const { uid, gid } = await postgresOsUser();
			await chown(pwfile, uid, gid);
		}
		await runPgOk(binDir, 'initdb', [
			'-D',
			paths.dataDir,
			'-U',
			SUPERUSER,
			`--pwfile=${pwfile}`,
			'--auth-local=scram-sha-256',
			'--auth-host=scram-sha-256',
			'--encoding=UTF8',
			'--locale=C.UTF-8',
			'--no-instructions'
		]);
	} finally {
		await rm(pwfile, { force: true });
	}
}

async function logTail(paths: ClusterPaths, lines = 20): Promise<string> {
	try {
		return (await readFile(paths.logFile, 'utf8')).trimEnd().split('\n').slice(-lines).join('\n');
	} catch {
		return '';
	}
}

async function pgStart(binDir: string, paths: ClusterPaths, port: number, ephemeral: boolean, log: Log): Promise<void> {
	// random_page_cost 1.1: the clusters live on the machine's SSD, where a random page read costs about what a
	// sequential one does (PostgreSQL manual, "Planner Cost Constants", suggests 1.1 for solid-state drives; from
	// memory). At the default 4 the audit search hashed all 20,000 run summaries at 1M records instead of probing
	// the 150 it needs.
	const serverOptions = [
		`-c listen_addresses=${HOST}`,
		`-p ${port}`,
		`-k '${paths.runDir}'`,
		'-c random_page_cost=1.1'
	];
	if (ephemeral) serverOptions.push('-c fsync=off', '-c synchronous_commit=off', '-c full_page_writes=off');
	log(`pg_ctl start on ${HOST}:${port}`);
	const result = await runPg(binDir, 'pg_ctl', [
		'start',
		'-D',
		paths.dataDir,
		'-l',
		paths.logFile,
		'-w',
		'-t',
		'60',
		'-o',
		serverOptions.join(' ')
	]);
	if (result.code !== 0) {
		const output = `${result.stderr}${result.stdout}`.trim();
		throw new Error(
			`PostgreSQL did not start on ${HOST}:${port} (is the port in use?)\n${output}\n--- ${paths.logFile} ---\n${await logTail(paths)}`
		);
	}
}

function quoteLiteral(value: string): string {
	return `'${value.replace(/'/g, "''")}'`;
}

/** Roles, database and grants; every statement is safe to repeat. */
async function provision(secrets: Secrets, port: number, database: string, log: Log): Promise<void> {
	const superuser = (db: string) => ({
		host: HOST,
		port,
		user: SUPERUSER,
		password: secrets.superuserPassword,
		database: db
	});
	const { Client } = loadPg();
	const open = async (db: string): Promise<PgClient> => {
		const client = new Client({ ...superuser(db), connectionTimeoutMillis: 10_000 });
		client.on('error', () => {});
		await client.connect();
		return client;
	};

	const admin = await open('postgres');
	try {
		const roles: Array<[string, string]> = [
			[OWNER_ROLE, secrets.ownerPassword],
			[APP_ROLE, secrets.appPassword]
		];
		for (const [role, password] of roles) {
			const found = await admin.query('SELECT 1 FROM pg_roles WHERE rolname = $1', [role]);
			const attributes = `LOGIN NOSUPERUSER NOCREATEDB NOCREATEROLE NOREPLICATION NOBYPASSRLS PASSWORD ${quoteLiteral(password)}`;
			if (found.rowCount) {
				await admin.query(`ALTER ROLE ${role} WITH ${attributes}`);
			} else {
				log(`create role ${role}`);
				await admin.query(`CREATE ROLE ${role} WITH ${attributes}`);
			}
		}
		const db = await admin.query<{ owner: string }>(
			'SELECT pg_get_userbyid(datdba) AS owner FROM pg_database WHERE datname = $1',
			[database]
		);
		if (!db.rowCount) {
			log(`create database ${database}`);
			await admin.query(`CREATE DATABASE ${database} OWNER ${OWNER_ROLE} ENCODING 'UTF8' TEMPLATE template0`);
		} else if (db.rows[0]?.owner !== OWNER_ROLE) {
			await admin.query(`ALTER DATABASE ${database} OWNER TO ${OWNER_ROLE}`);
		}
		await admin.query(`REVOKE ALL ON DATABASE ${database} FROM PUBLIC`);
		await admin.query(`GRANT CONNECT ON DATABASE ${database} TO ${APP_ROLE}`);
	} finally {
		await admin.end().catch(() => {});
	}

	const inDb = await open(database);
	try {
		// No GRANT ... ON ALL TABLES here: provisioning may run again after migrations that revoked UPDATE/DELETE on
		// ledger tables from the app role, and must not give those back.
		for (const sql of [
			`REVOKE CREATE ON SCHEMA public FROM PUBLIC`,
			`GRANT USAGE ON SCHEMA public TO ${APP_ROLE}`,
			`ALTER DEFAULT PRIVILEGES FOR ROLE ${OWNER_ROLE} IN SCHEMA public GRANT SELECT, INSERT, UPDATE, DELETE ON TABLES TO ${APP_ROLE}`,
			`ALTER DEFAULT PRIVILEGES FOR ROLE ${OWNER_ROLE} IN SCHEMA public GRANT USAGE, SELECT ON SEQUENCES TO ${APP_ROLE}`,
			`ALTER DEFAULT PRIVILEGES FOR ROLE ${OWNER_ROLE} IN SCHEMA public GRANT EXECUTE ON FUNCTIONS TO ${APP_ROLE}`
		]) {
			await inDb.query(sql);
		}
	} finally {
		await inDb.end().catch(() => {});
	}
}

/**
 * Starts (initialising on first use) the cluster in opts.baseDir and returns its URLs. Idempotent: when the server
 * is already running and the database provisioned, it only reads the secrets (a few milliseconds plus one
 * `pg_ctl status`).
 */
export async function startCluster(opts: ClusterOptions): Promise<ClusterUrls> {
	const log = opts.log ?? silent;
	assertSafePath(opts.baseDir);
	assertDatabaseName(opts.database);
	assertPort(opts.port);
	const paths = clusterPaths(opts.baseDir);
	const binDir = await ensurePostgresInstalled(log);

	let initialised = await isInitialised(paths);
	let secrets = await readSecrets(paths.secretsFile);
	if (initialised && !secrets) {
		throw new Error(
			`${paths.dataDir} exists but ${paths.secretsFile} is missing, so its passwords are unknown; reset the cluster`
		);
	}

	if (initialised && secrets && (await isRunning(binDir, paths))) {
		const port = (await postmasterPort(paths)) ?? secrets.port;
		if (secrets.provisioned.includes(opts.database)) return buildUrls(secrets, port, opts.database);
		await provision(secrets, port, opts.database, log);
		secrets = { ...secrets, provisioned: [...secrets.provisioned, opts.database] };
		await writeSecrets(paths.secretsFile, secrets);
		return buildUrls(secrets, port, opts.database);
	}

	if (!secrets) {
		secrets = {
			version: 1,
			port: opts.port,
			superuserPassword: generatePassword(),
			ownerPassword: generatePassword(),
			appPassword: generatePassword(),
			provisioned: []
		};
		await mkdir(paths.baseDir, { recursive: true });
		await writeSecrets(paths.secretsFile, secrets);
	} else if (secrets.port !== opts.port) {
		log(`cluster in ${paths.baseDir} was created on port ${secrets.port}; using it (reset to change the port)`);
	}

	await prepareDirectories(paths);
	if (!initialised) {
		await initdb(binDir, paths, secrets.superuserPassword, log);
		initialised = true;
		secrets = { ...secrets, provisioned: [] };
		await writeSecrets(paths.secretsFile, secrets);
	}

	await pgStart(binDir, paths, secrets.port, opts.ephemeral ?? false, log);
	const port = (await postmasterPort(paths)) ?? secrets.port;
	if (!secrets.provisioned.includes(opts.database)) {
		await provision(secrets, port, opts.database, log);
		secrets = { ...secrets, provisioned: [...secrets.provisioned, opts.database] };
		await writeSecrets(paths.secretsFile, secrets);
	}
	return buildUrls(secrets, port, opts.database);
}

/** Stops the cluster in baseDir (fast shutdown, waits); a no-op when it is not initialised or not running. */
export async function stopCluster(baseDir: string): Promise<void> {
	const paths = clusterPaths(baseDir);
	if (!(await isInitialised(paths))) return;
	const binDir = await findPostgresBin();
	if (!binDir) return;
	if (!(await isRunning(binDir, paths))) return;
	await runPgOk(binDir, 'pg_ctl', ['stop', '-D', paths.dataDir, '-m', 'fast', '-w', '-t', '60']);
}

/** Stops the cluster, deletes its data directory, socket directory and secrets, and starts a fresh one on opts.port. */
export async function resetCluster(opts: ClusterOptions): Promise<ClusterUrls> {
	assertSafePath(opts.baseDir);
	const paths = clusterPaths(opts.baseDir);
	await stopCluster(opts.baseDir);
	(opts.log ?? silent)(`delete ${paths.dataDir} and ${paths.secretsFile}`);
	await rm(paths.dataDir, { recursive: true, force: true });
	await rm(paths.runDir, { recursive: true, force: true });
	await rm(paths.secretsFile, { force: true });
	return startCluster(opts);
}

/** A TCP port on 127.0.0.1 that was free a moment ago (the OS picks it). */
export function freePort(): Promise<number> {
	return new Promise((resolve, reject) => {
		const server = createServer();
		server.unref();
		server.on('error', reject);
		server.listen(0, HOST, () => {
			const address = server.address();
			const port = typeof address === 'object' && address ? address.port : 0;
			server.close(() => (port ? resolve(port) : reject(new Error('could not find a free port'))));
		});
	});
}
