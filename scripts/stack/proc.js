"use strict";
// Small process and port helpers (Linux /proc based; no extra packages).
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
Object.defineProperty(exports, "__esModule", { value: true });
exports.sleep = void 0;
exports.isAlive = isAlive;
exports.cmdline = cmdline;
exports.procCwd = procCwd;
exports.portOpen = portOpen;
exports.portFree = portFree;
exports.listenerPids = listenerPids;
exports.killTree = killTree;
exports.terminate = terminate;
var node_fs_1 = require("node:fs");
var node_net_1 = require("node:net");
function isAlive(pid) {
    if (!Number.isInteger(pid) || pid <= 0)
        return false;
    try {
        process.kill(pid, 0);
        return true;
    }
    catch (e) {
        return e.code === "EPERM";
    }
}
function cmdline(pid) {
    try {
        return node_fs_1.default.readFileSync("/proc/".concat(pid, "/cmdline"), "utf8").split("\0").filter(Boolean).join(" ");
    }
    catch (_a) {
        return "";
    }
}
function procCwd(pid) {
    try {
        return node_fs_1.default.readlinkSync("/proc/".concat(pid, "/cwd"));
    }
    catch (_a) {
        return null;
    }
}
/** Resolves true when something accepts TCP connections on host:port. */
function portOpen(port, host, timeoutMs) {
    if (host === void 0) { host = "127.0.0.1"; }
    if (timeoutMs === void 0) { timeoutMs = 500; }
    return new Promise(function (resolve) {
        var sock = node_net_1.default.connect({ port: port, host: host });
        var done = function (v) {
            sock.destroy();
            resolve(v);
        };
        sock.setTimeout(timeoutMs, function () { return done(false); });
        sock.once("connect", function () { return done(true); });
        sock.once("error", function () { return done(false); });
    });
}
/** Resolves true when we can bind host:port ourselves right now. */
function portFree(port, host) {
    if (host === void 0) { host = "127.0.0.1"; }
    return new Promise(function (resolve) {
        var srv = node_net_1.default.createServer();
        srv.once("error", function () { return resolve(false); });
        srv.listen(port, host, function () { return srv.close(function () { return resolve(true); }); });
    });
}
function listeningInodes(port) {
    var _a;
    var inodes = new Set();
    for (var _i = 0, _b = ["/proc/net/tcp", "/proc/net/tcp6"]; _i < _b.length; _i++) {
        var file = _b[_i];
        var text = void 0;
        try {
            text = node_fs_1.default.readFileSync(file, "utf8");
        }
        catch (_c) {
            continue;
        }
        for (var _d = 0, _e = text.split("\n").slice(1); _d < _e.length; _d++) {
            var line = _e[_d];
            var cols = line.trim().split(/\s+/);
            if (cols.length < 10)
                continue;
            var local = cols[1];
            var state = cols[3];
            var localPort = parseInt((_a = local.split(":")[1]) !== null && _a !== void 0 ? _a : "", 16);
            if (state === "0A" && localPort === port)
                inodes.add(cols[9]);
        }
    }
    return inodes;
}
/** PIDs of processes (that we may inspect) holding a listening socket on `port`. */
function listenerPids(port) {
    var inodes = listeningInodes(port);
    if (inodes.size === 0)
        return [];
    var pids = [];
    for (var _i = 0, _a = node_fs_1.default.readdirSync("/proc"); _i < _a.length; _i++) {
        var entry = _a[_i];
        if (!/^\d+$/.test(entry))
            continue;
        var fds = void 0;
        try {
            fds = node_fs_1.default.readdirSync("/proc/".concat(entry, "/fd"));
        }
        catch (_b) {
            continue;
        }
        for (var _c = 0, fds_1 = fds; _c < fds_1.length; _c++) {
            var fd = fds_1[_c];
            try {
                var target = node_fs_1.default.readlinkSync("/proc/".concat(entry, "/fd/").concat(fd));
                var m = /^socket:\[(\d+)\]$/.exec(target);
                if (m && inodes.has(m[1])) {
                    pids.push(Number(entry));
                    break;
                }
            }
            catch (_d) {
                // fd closed meanwhile
            }
        }
    }
    return pids;
}
var sleep = function (ms) { return new Promise(function (r) { return setTimeout(r, ms); }); };
exports.sleep = sleep;
/** Send `signal` to the process group of `pid` (falls back to the process itself). */
function killTree(pid, signal) {
    try {
        process.kill(-pid, signal);
        return;
    }
    catch (_a) {
        // not a group leader
    }
    try {
        process.kill(pid, signal);
    }
    catch (_b) {
        // already gone
    }
}
/** SIGTERM the group, wait up to `graceMs`, then SIGKILL. */
function terminate(pid_1) {
    return __awaiter(this, arguments, void 0, function (pid, graceMs) {
        var until;
        if (graceMs === void 0) { graceMs = 8000; }
        return __generator(this, function (_a) {
            switch (_a.label) {
                case 0:
                    if (!isAlive(pid))
                        return [2 /*return*/];
                    killTree(pid, "SIGTERM");
                    until = Date.now() + graceMs;
                    _a.label = 1;
                case 1:
                    if (!(Date.now() < until)) return [3 /*break*/, 3];
                    if (!isAlive(pid))
                        return [2 /*return*/];
                    return [4 /*yield*/, (0, exports.sleep)(100)];
                case 2:
                    _a.sent();
                    return [3 /*break*/, 1];
                case 3:
                    killTree(pid, "SIGKILL");
                    return [4 /*yield*/, (0, exports.sleep)(100)];
                case 4:
                    _a.sent();
                    return [2 /*return*/];
            }
        });
    });
}
