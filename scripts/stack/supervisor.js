"use strict";
// Children of the stack: long-running services and one-shot steps, with logs and orderly shutdown.
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
exports.Supervisor = void 0;
var node_child_process_1 = require("node:child_process");
var node_fs_1 = require("node:fs");
var node_path_1 = require("node:path");
var proc_1 = require("./proc");
var Supervisor = /** @class */ (function () {
    function Supervisor(root, stateFile) {
        this.root = root;
        this.stateFile = stateFile;
        this.services = [];
        this.step = null;
        this.stopping = false;
        this.onUnexpectedExit = function () { };
    }
    Supervisor.prototype.writeState = function () {
        var state = {
            supervisorPid: process.pid,
            root: this.root,
            children: Object.fromEntries(this.services.map(function (s) { return [s.spec.name, s.child.pid]; })),
            updatedAt: new Date().toISOString(),
        };
        node_fs_1.default.writeFileSync(this.stateFile, JSON.stringify(state, null, 2) + "\n");
    };
    Supervisor.prototype.clearState = function () {
        node_fs_1.default.rmSync(this.stateFile, { force: true });
    };
    Supervisor.prototype.start = function (spec) {
        var _this = this;
        node_fs_1.default.mkdirSync(node_path_1.default.dirname(spec.logFile), { recursive: true });
        var log = node_fs_1.default.createWriteStream(spec.logFile, { flags: "a" });
        log.write("\n--- ".concat(new Date().toISOString(), " start ").concat(spec.cmd, " ").concat(spec.args.join(" "), "\n"));
        // Own process group: a terminal Ctrl-C reaches only us, and we stop the children in order.
        var child = (0, node_child_process_1.spawn)(spec.cmd, spec.args, {
            cwd: this.root,
            env: spec.env,
            stdio: ["ignore", "pipe", "pipe"],
            detached: true,
        });
        var forward = function (stream) {
            var pending = "";
            stream.on("data", function (buf) {
                var _a;
                log.write(buf);
                if (!spec.echo)
                    return;
                pending += buf.toString("utf8");
                var lines = pending.split("\n");
                pending = (_a = lines.pop()) !== null && _a !== void 0 ? _a : "";
                for (var _i = 0, lines_1 = lines; _i < lines_1.length; _i++) {
                    var line = lines_1[_i];
                    process.stdout.write("[".concat(spec.name, "] ").concat(line, "\n"));
                }
            });
        };
        forward(child.stdout);
        forward(child.stderr);
        var exited = new Promise(function (resolve) {
            child.on("error", function (err) {
                log.write("spawn error: ".concat(err.message, "\n"));
                resolve(127);
            });
            child.on("exit", function (code, signal) {
                var c = code !== null && code !== void 0 ? code : (signal ? 128 : 1);
                log.write("--- exited ".concat(code !== null && code !== void 0 ? code : signal, "\n"));
                log.end();
                _this.services = _this.services.filter(function (s) { return s.child !== child; });
                if (!_this.stopping)
                    _this.onUnexpectedExit(spec.name, c);
                resolve(c);
            });
        });
        var running = { spec: spec, child: child, exited: exited };
        this.services.push(running);
        this.writeState();
        return running;
    };
    Supervisor.prototype.isRunning = function (name) {
        return this.services.some(function (s) { return s.spec.name === name; });
    };
    /** Run a command to completion. Resolves with its exit code and (for "tee"/"log") its output. */
    Supervisor.prototype.run = function (name, cmd, args, o) {
        var _this = this;
        return new Promise(function (resolve) {
            var _a, _b;
            if (_this.stopping)
                return resolve({ code: 130, output: "" });
            var log = o.logFile ? node_fs_1.default.createWriteStream(o.logFile, { flags: "a" }) : null;
            var child = (0, node_child_process_1.spawn)(cmd, args, {
                cwd: _this.root,
                env: o.env,
                stdio: o.output === "inherit" ? ["ignore", "inherit", "inherit"] : ["ignore", "pipe", "pipe"],
                detached: true,
            });
            _this.step = child;
            var output = "";
            var collect = function (buf) {
                var s = buf.toString("utf8");
                output += s;
                if (output.length > 4000000)
                    output = output.slice(-2000000);
                log === null || log === void 0 ? void 0 : log.write(buf);
                if (o.output === "tee")
                    process.stdout.write(buf);
            };
            (_a = child.stdout) === null || _a === void 0 ? void 0 : _a.on("data", collect);
            (_b = child.stderr) === null || _b === void 0 ? void 0 : _b.on("data", collect);
            child.on("error", function (err) {
                output += "\n".concat(name, ": ").concat(err.message, "\n");
            });
            child.on("close", function (code, signal) {
                _this.step = null;
                log === null || log === void 0 ? void 0 : log.end();
                resolve({ code: code !== null && code !== void 0 ? code : (signal ? 128 : 1), output: output });
            });
        });
    };
    /** Stop the current step and every service, newest first. */
    Supervisor.prototype.stopAll = function () {
        return __awaiter(this, void 0, void 0, function () {
            var services, _i, services_1, s;
            var _a, _b;
            return __generator(this, function (_c) {
                switch (_c.label) {
                    case 0:
                        this.stopping = true;
                        if (!((_a = this.step) === null || _a === void 0 ? void 0 : _a.pid)) return [3 /*break*/, 2];
                        return [4 /*yield*/, (0, proc_1.terminate)(this.step.pid, 3000)];
                    case 1:
                        _c.sent();
                        _c.label = 2;
                    case 2:
                        services = __spreadArray([], this.services, true).reverse();
                        _i = 0, services_1 = services;
                        _c.label = 3;
                    case 3:
                        if (!(_i < services_1.length)) return [3 /*break*/, 8];
                        s = services_1[_i];
                        if (!(s.child.pid && (0, proc_1.isAlive)(s.child.pid))) return [3 /*break*/, 5];
                        return [4 /*yield*/, (0, proc_1.terminate)(s.child.pid, (_b = s.spec.graceMs) !== null && _b !== void 0 ? _b : 8000)];
                    case 4:
                        _c.sent();
                        _c.label = 5;
                    case 5: return [4 /*yield*/, Promise.race([s.exited, new Promise(function (r) { return setTimeout(r, 2000); })])];
                    case 6:
                        _c.sent();
                        _c.label = 7;
                    case 7:
                        _i++;
                        return [3 /*break*/, 3];
                    case 8: return [2 /*return*/];
                }
            });
        });
    };
    return Supervisor;
}());
exports.Supervisor = Supervisor;
