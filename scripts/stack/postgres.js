"use strict";
// A project-local PostgreSQL cluster from Debian's packages, on loopback and a port of our own.
var __assign = (this && this.__assign) || function () {
    __assign = Object.assign || function(t) {
        for (var s, i = 1, n = arguments.length; i < n; i++) {
            s = arguments[i];
            for (var p in s) if (Object.prototype.hasOwnProperty.call(s, p))
                t[p] = s[p];
        }
        return t;
    };
    return __assign.apply(this, arguments);
};
var __awaiter = (this && this.__awaiter) || function (thisArg, _arguments, P, generator) {
    function adopt(value) { return value instanceof P ? value : new P(function (resolve) { resolve(value); }); }
    return new (P || (P = Promise))(function (resolve, reject) {
        function fulfilled(value) { try { step(generator.next(value)); } catch (e) { reject(e); } }
        function rejected(value) { try { step(generator["throw"](value)); } catch (e) { reject(e); } }
        function step(result) { result.done ? resolve(result.value) : adopt(result.value).then(fulfilled, rejected); }
        step((generator = generator.apply(thisArg, _arguments || [])).next());
    });
};
var __generator = (this && this.__generator) || function (thisArg, body) {
    var _ = { label: 0, sent: function() { if (t[0] & 1) throw t[1]; return t[1]; }, trys: [], ops: [] }, f, y, t, g = Object.create((typeof Iterator === "function" ? Iterator : Object).prototype);
    return g.next = verb(0), g["throw"] = verb(1), g["return"] = verb(2), typeof Symbol === "function" && (g[Symbol.iterator] = function() { return this; }), g;
    function verb(n) { return function (v) { return step([n, v]); }; }
    function step(op) {
        if (f) throw new TypeError("Generator is already executing.");
        while (g && (g = 0, op[0] && (_ = 0)), _) try {
            if (f = 1, y && (t = op[0] & 2 ? y["return"] : op[0] ? y["throw"] || ((t = y["return"]) && t.call(y), 0) : y.next) && !(t = t.call(y, op[1])).done) return t;
            if (y = 0, t) op = [op[0] & 2, t.value];
            switch (op[0]) {
                case 0: case 1: t = op; break;
                case 4: _.label++; return { value: op[1], done: false };
                case 5: _.label++; y = op[1]; op = [0]; continue;
                case 7: op = _.ops.pop(); _.trys.pop(); continue;
                default:
                    if (!(t = _.trys, t = t.length > 0 && t[t.length - 1]) && (op[0] === 6 || op[0] === 2)) { _ = 0; continue; }
                    if (op[0] === 3 && (!t || (op[1] > t[0] && op[1] < t[3]))) { _.label = op[1]; break; }
                    if (op[0] === 6 && _.label < t[1]) { _.label = t[1]; t = op; break; }
                    if (t && _.label < t[2]) { _.label = t[2]; _.ops.push(op); break; }
                    if (t[2]) _.ops.pop();
                    _.trys.pop(); continue;
            }
            op = body.call(thisArg, _);
        } catch (e) { op = [6, e]; y = 0; } finally { f = t = 0; }
        if (op[0] & 5) throw op[1]; return { value: op[0] ? op[1] : void 0, done: true };
    }
};
var __spreadArray = (this && this.__spreadArray) || function (to, from, pack) {
    if (pack || arguments.length === 2) for (var i = 0, l = from.length, ar; i < l; i++) {
        if (ar || !(i in from)) {
            if (!ar) ar = Array.prototype.slice.call(from, 0, i);
            ar[i] = from[i];
        }
    }
    return to.concat(ar || Array.prototype.slice.call(from));
};
Object.defineProperty(exports, "__esModule", { value: true });
exports.findPgBin = findPgBin;
exports.ensurePostgres = ensurePostgres;
exports.stopPostgres = stopPostgres;
exports.removeClusterStorage = removeClusterStorage;
var node_child_process_1 = require("node:child_process");
var node_crypto_1 = require("node:crypto");
var node_fs_1 = require("node:fs");
var node_os_1 = require("node:os");
var node_path_1 = require("node:path");
var pg_1 = require("pg");
var proc_1 = require("./proc");
var isRoot = function () { var _a; return ((_a = process.getuid) === null || _a === void 0 ? void 0 : _a.call(process)) === 0; };
function findPgBin() {
    if (process.env.PG_BIN && node_fs_1.default.existsSync(node_path_1.default.join(process.env.PG_BIN, "initdb")))
        return process.env.PG_BIN;
    var base = "/usr/lib/postgresql";
    var versions = [];
    try {
        versions = node_fs_1.default.readdirSync(base).filter(function (v) { return node_fs_1.default.existsSync(node_path_1.default.join(base, v, "bin", "initdb")); });
    }
    catch (_a) {
        return null;
    }
    versions.sort(function (a, b) { return Number(b) - Number(a); });
    return versions[0] ? node_path_1.default.join(base, versions[0], "bin") : null;
}
function userNameOf(uid) {
    try {
        for (var _i = 0, _a = node_fs_1.default.readFileSync("/etc/passwd", "utf8").split("\n"); _i < _a.length; _i++) {
            var line = _a[_i];
            var f = line.split(":");
            if (Number(f[2]) === uid)
                return f[0];
        }
    }
    catch (_b) {
        // no passwd file
    }
    return null;
}
function uidGidOf(name) {
    try {
        for (var _i = 0, _a = node_fs_1.default.readFileSync("/etc/passwd", "utf8").split("\n"); _i < _a.length; _i++) {
            var line = _a[_i];
            var f = line.split(":");
            if (f[0] === name)
                return { uid: Number(f[2]), gid: Number(f[3]) };
        }
    }
    catch (_b) {
        // no passwd file
    }
    return null;
}
/** As root, the server runs as the owner of an existing cluster folder, else as `postgres`. */
function serverUser(pgdata) {
    var _a;
    if (!isRoot())
        return null;
    try {
        var st = node_fs_1.default.statSync(pgdata);
        if (st.uid !== 0)
            return (_a = userNameOf(st.uid)) !== null && _a !== void 0 ? _a : "postgres";
    }
    catch (_b) {
        // not created yet
    }
    return "postgres";
}
function run(binDir, asUser, cmd, args) {
    var _a, _b, _c;
    var exe = node_path_1.default.join(binDir, cmd);
    var _d = asUser ? ["runuser", __spreadArray(["-u", asUser, "--", exe], args, true)] : [exe, args], file = _d[0], argv = _d[1];
    // cwd "/" so the server user never needs access to the current folder.
    var r = (0, node_child_process_1.spawnSync)(file, argv, { cwd: "/", encoding: "utf8", env: __assign(__assign({}, process.env), { LC_ALL: "C.UTF-8" }) });
    if (r.error)
        throw r.error;
    return { status: (_a = r.status) !== null && _a !== void 0 ? _a : 1, out: "".concat((_b = r.stdout) !== null && _b !== void 0 ? _b : "").concat((_c = r.stderr) !== null && _c !== void 0 ? _c : "") };
}
function canAccess(user, dir) {
    if (!user)
        return true;
    var r = (0, node_child_process_1.spawnSync)("runuser", ["-u", user, "--", "test", "-w", dir, "-a", "-x", dir], { cwd: "/" });
    return r.status === 0;
}
function chownTo(user) {
    var paths = [];
    for (var _i = 1; _i < arguments.length; _i++) {
        paths[_i - 1] = arguments[_i];
    }
    if (!user)
        return;
    var ids = uidGidOf(user);
    if (!ids)
        throw new Error("system user ".concat(user, " not found (is the postgresql package installed?)"));
    for (var _a = 0, paths_1 = paths; _a < paths_1.length; _a++) {
        var p = paths_1[_a];
        node_fs_1.default.chownSync(p, ids.uid, ids.gid);
    }
}
function tail(file, lines) {
    if (lines === void 0) { lines = 30; }
    try {
        return node_fs_1.default.readFileSync(file, "utf8").split("\n").slice(-lines).join("\n");
    }
    catch (_a) {
        return "(no log)";
    }
}
/**
 * Where the cluster lives. Normally <data>/pg with its socket in <data>/pg-run. When running as root in
 * a folder the `postgres` user cannot enter (e.g. a clone under /root), the cluster is placed under
 * /var/lib/bandcross/<hash> and <data>/pg becomes a symlink to it.
 */
function layout(dataDir, user) {
    var link = node_path_1.default.join(dataDir, "pg");
    var pgdata = link;
    try {
        if (node_fs_1.default.lstatSync(link).isSymbolicLink())
            pgdata = node_fs_1.default.realpathSync(link);
    }
    catch (_a) {
        // not created yet
    }
    var home = node_path_1.default.dirname(pgdata);
    if (pgdata === link && !node_fs_1.default.existsSync(link) && user) {
        node_fs_1.default.mkdirSync(link, { recursive: true, mode: 448 });
        chownTo(user, link);
        if (!canAccess(user, link)) {
            node_fs_1.default.rmdirSync(link);
            var alt = node_path_1.default.join("/var/lib/bandcross", (0, node_crypto_1.createHash)("sha1").update(node_path_1.default.resolve(dataDir)).digest("hex").slice(0, 12));
            node_fs_1.default.mkdirSync(node_path_1.default.join(alt, "pg"), { recursive: true, mode: 448 });
            node_fs_1.default.chmodSync("/var/lib/bandcross", 493);
            node_fs_1.default.chmodSync(alt, 493);
            chownTo(user, node_path_1.default.join(alt, "pg"));
            node_fs_1.default.symlinkSync(node_path_1.default.join(alt, "pg"), link);
            return { pgdata: node_path_1.default.join(alt, "pg"), socketDir: socketDirFor(alt) };
        }
    }
    return { pgdata: pgdata, socketDir: socketDirFor(home) };
}
function socketDirFor(home) {
    var dir = node_path_1.default.join(home, "pg-run");
    // A Unix socket path is limited to 107 bytes: fall back to /tmp for very deep folders.
    if (Buffer.byteLength(node_path_1.default.join(dir, ".s.PGSQL.65535")) < 100)
        return dir;
    return node_path_1.default.join(node_os_1.default.tmpdir(), "bandcross-pg-".concat((0, node_crypto_1.createHash)("sha1").update(home).digest("hex").slice(0, 10)));
}
function readPidFile(pgdata) {
    try {
        var lines = node_fs_1.default.readFileSync(node_path_1.default.join(pgdata, "postmaster.pid"), "utf8").split("\n");
        return { pid: Number(lines[0]), port: Number(lines[3]) };
    }
    catch (_a) {
        return null;
    }
}
/** A postmaster.pid whose process is gone (or is some other program now) is removed. */
function clearStaleLock(pgdata, socketDir, log) {
    var pf = readPidFile(pgdata);
    if (!pf)
        return null;
    if ((0, proc_1.isAlive)(pf.pid) && /postgres|postmaster/.test((0, proc_1.cmdline)(pf.pid)))
        return pf;
    log("removing stale postmaster.pid (pid ".concat(pf.pid, " is not running)"));
    node_fs_1.default.rmSync(node_path_1.default.join(pgdata, "postmaster.pid"), { force: true });
    for (var _i = 0, _a = [".s.PGSQL.".concat(pf.port), ".s.PGSQL.".concat(pf.port, ".lock")]; _i < _a.length; _i++) {
        var f = _a[_i];
        node_fs_1.default.rmSync(node_path_1.default.join(socketDir, f), { force: true });
    }
    return null;
}
function ensurePostgres(o) {
    return __awaiter(this, void 0, void 0, function () {
        var binDir, user, _a, pgdata, socketDir, logDir, logFile, pwfile, r, conf, running, startedHere, opts, r;
        return __generator(this, function (_b) {
            switch (_b.label) {
                case 0:
                    binDir = findPgBin();
                    if (!binDir)
                        throw new Error("PostgreSQL binaries not found under /usr/lib/postgresql/*/bin (apt-get install -y postgresql)");
                    node_fs_1.default.mkdirSync(o.dataDir, { recursive: true });
                    user = serverUser(node_path_1.default.join(o.dataDir, "pg"));
                    _a = layout(o.dataDir, user), pgdata = _a.pgdata, socketDir = _a.socketDir;
                    logDir = node_path_1.default.join(o.dataDir, "logs");
                    logFile = node_path_1.default.join(logDir, "postgres.log");
                    node_fs_1.default.mkdirSync(logDir, { recursive: true });
                    node_fs_1.default.mkdirSync(socketDir, { recursive: true, mode: 493 });
                    if (!node_fs_1.default.existsSync(logFile))
                        node_fs_1.default.writeFileSync(logFile, "");
                    chownTo(user, socketDir, logFile);
                    // 1. initdb once
                    if (!node_fs_1.default.existsSync(node_path_1.default.join(pgdata, "PG_VERSION"))) {
                        node_fs_1.default.rmSync(pgdata, { recursive: true, force: true }); // a half-made folder from an interrupted init
                        node_fs_1.default.mkdirSync(pgdata, { recursive: true, mode: 448 });
                        chownTo(user, pgdata);
                        pwfile = node_path_1.default.join(node_os_1.default.tmpdir(), "bandcross-pw-".concat(process.pid));
                        node_fs_1.default.writeFileSync(pwfile, "".concat(o.password, "\n"), { mode: 384 });
                        chownTo(user, pwfile);
                        try {
                            o.log("initdb ".concat(pgdata).concat(user ? " (as ".concat(user, ")") : ""));
                            r = run(binDir, user, "initdb", [
                                "-D", pgdata, "-U", o.user,
                                "--pwfile=".concat(pwfile),
                                "-A", "scram-sha-256", "-E", "UTF8", "--locale=C.UTF-8",
                            ]);
                            if (r.status !== 0)
                                throw new Error("initdb failed:\n".concat(r.out));
                        }
                        finally {
                            node_fs_1.default.rmSync(pwfile, { force: true });
                        }
                        conf = __spreadArray(__spreadArray([
                            "",
                            "# --- Bandcross local cluster ---",
                            "listen_addresses = '127.0.0.1'",
                            "port = ".concat(o.port),
                            "unix_socket_directories = '".concat(socketDir, "'"),
                            "max_connections = 100"
                        ], (o.fast ? ["fsync = off", "synchronous_commit = off", "full_page_writes = off"] : []), true), [
                            "",
                        ], false).join("\n");
                        node_fs_1.default.appendFileSync(node_path_1.default.join(pgdata, "postgresql.conf"), conf);
                    }
                    running = clearStaleLock(pgdata, socketDir, o.log);
                    if (running && running.port !== o.port) {
                        o.log("cluster is running on port ".concat(running.port, ", restarting it on ").concat(o.port));
                        run(binDir, user, "pg_ctl", ["-D", pgdata, "-m", "fast", "-w", "stop"]);
                        running = null;
                    }
                    startedHere = false;
                    if (!running) return [3 /*break*/, 1];
                    o.log("PostgreSQL already running (pid ".concat(running.pid, "), reusing it"));
                    return [3 /*break*/, 3];
                case 1: return [4 /*yield*/, (0, proc_1.portFree)(o.port)];
                case 2:
                    if (!(_b.sent())) {
                        throw new Error("port ".concat(o.port, " on 127.0.0.1 is used by another program; stop it or free the port"));
                    }
                    opts = "-c listen_addresses=127.0.0.1 -p ".concat(o.port, " -k ").concat(socketDir);
                    r = run(binDir, user, "pg_ctl", ["-D", pgdata, "-l", logFile, "-w", "-t", "60", "-o", opts, "start"]);
                    if (r.status !== 0) {
                        throw new Error("pg_ctl start failed:\n".concat(r.out, "\n--- ").concat(logFile, " ---\n").concat(tail(logFile)));
                    }
                    startedHere = true;
                    _b.label = 3;
                case 3: 
                // 3. the database
                return [4 /*yield*/, createDatabaseIfMissing(o)];
                case 4:
                    // 3. the database
                    _b.sent();
                    return [2 /*return*/, { pgdata: pgdata, socketDir: socketDir, logFile: logFile, binDir: binDir, startedHere: startedHere }];
            }
        });
    });
}
function createDatabaseIfMissing(o) {
    return __awaiter(this, void 0, void 0, function () {
        var deadline, client, r, e_1;
        return __generator(this, function (_a) {
            switch (_a.label) {
                case 0:
                    deadline = Date.now() + 20000;
                    _a.label = 1;
                case 1:
                    client = new pg_1.default.Client({ host: "127.0.0.1", port: o.port, user: o.user, password: o.password, database: "postgres" });
                    _a.label = 2;
                case 2:
                    _a.trys.push([2, 7, 9, 11]);
                    return [4 /*yield*/, client.connect()];
                case 3:
                    _a.sent();
                    return [4 /*yield*/, client.query("SELECT 1 FROM pg_database WHERE datname = $1", [o.database])];
                case 4:
                    r = _a.sent();
                    if (!(r.rowCount === 0)) return [3 /*break*/, 6];
                    o.log("creating database ".concat(o.database));
                    return [4 /*yield*/, client.query("CREATE DATABASE \"".concat(o.database.replace(/"/g, '""'), "\""))];
                case 5:
                    _a.sent();
                    _a.label = 6;
                case 6: return [2 /*return*/];
                case 7:
                    e_1 = _a.sent();
                    if (Date.now() > deadline)
                        throw e_1;
                    return [4 /*yield*/, (0, proc_1.sleep)(300)];
                case 8:
                    _a.sent();
                    return [3 /*break*/, 11];
                case 9: return [4 /*yield*/, client.end().catch(function () { })];
                case 10:
                    _a.sent();
                    return [7 /*endfinally*/];
                case 11: return [3 /*break*/, 1];
                case 12: return [2 /*return*/];
            }
        });
    });
}
function stopPostgres(dataDir, mode) {
    if (mode === void 0) { mode = "fast"; }
    var binDir = findPgBin();
    if (!binDir)
        return;
    var link = node_path_1.default.join(dataDir, "pg");
    var pgdata = link;
    try {
        pgdata = node_fs_1.default.realpathSync(link);
    }
    catch (_a) {
        return;
    }
    if (!node_fs_1.default.existsSync(node_path_1.default.join(pgdata, "postmaster.pid")))
        return;
    var r = run(binDir, serverUser(pgdata), "pg_ctl", ["-D", pgdata, "-m", mode, "-w", "-t", "30", "stop"]);
    if (r.status !== 0 && readPidFile(pgdata) && (0, proc_1.isAlive)(readPidFile(pgdata).pid)) {
        throw new Error("pg_ctl stop failed:\n".concat(r.out));
    }
}
/** Remove a cluster that lives outside the data folder (the /var/lib/bandcross fallback). */
function removeClusterStorage(dataDir) {
    var link = node_path_1.default.join(dataDir, "pg");
    try {
        if (node_fs_1.default.lstatSync(link).isSymbolicLink()) {
            var target = node_fs_1.default.realpathSync(link);
            node_fs_1.default.rmSync(node_path_1.default.dirname(target), { recursive: true, force: true });
        }
    }
    catch (_a) {
        // nothing there
    }
}
