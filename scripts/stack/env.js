"use strict";
// Local secrets and the environment handed to every process of the stack.
Object.defineProperty(exports, "__esModule", { value: true });
exports.BUCKET = exports.DB_NAME = exports.PG_USER = void 0;
exports.loadOrCreateSecrets = loadOrCreateSecrets;
exports.stackEnv = stackEnv;
exports.formatEnvFile = formatEnvFile;
exports.writeEnvFile = writeEnvFile;
var node_crypto_1 = require("node:crypto");
var node_fs_1 = require("node:fs");
var node_path_1 = require("node:path");
/** Generated once per data folder, kept in <data>/secrets.json (mode 600), never committed. */
function loadOrCreateSecrets(dataDir) {
    var _a, _b, _c, _d, _e;
    var file = node_path_1.default.join(dataDir, "secrets.json");
    var existing = {};
    try {
        existing = JSON.parse(node_fs_1.default.readFileSync(file, "utf8"));
    }
    catch (_f) {
        // first start
    }
    var secrets = {
        AUTH_SECRET: (_a = existing.AUTH_SECRET) !== null && _a !== void 0 ? _a : (0, node_crypto_1.randomBytes)(32).toString("base64url"),
        TOKEN_SECRET: (_b = existing.TOKEN_SECRET) !== null && _b !== void 0 ? _b : (0, node_crypto_1.randomBytes)(32).toString("base64url"),
        PG_PASSWORD: (_c = existing.PG_PASSWORD) !== null && _c !== void 0 ? _c : (0, node_crypto_1.randomBytes)(18).toString("hex"),
        // s3rver accepts only this key pair; a real bucket gets real keys through the environment.
        S3_ACCESS_KEY_ID: (_d = existing.S3_ACCESS_KEY_ID) !== null && _d !== void 0 ? _d : "S3RVER",
        S3_SECRET_ACCESS_KEY: (_e = existing.S3_SECRET_ACCESS_KEY) !== null && _e !== void 0 ? _e : "S3RVER",
    };
    if (JSON.stringify(secrets) !== JSON.stringify(existing)) {
        node_fs_1.default.mkdirSync(dataDir, { recursive: true });
        node_fs_1.default.writeFileSync(file, JSON.stringify(secrets, null, 2) + "\n", { mode: 384 });
    }
    return secrets;
}
exports.PG_USER = "bandcross";
exports.DB_NAME = "bandcross";
exports.BUCKET = "bandcross-raw";
/** The contract with the application (validated by lib/env.ts). */
function stackEnv(opts) {
    var ports = opts.ports, secrets = opts.secrets;
    var appUrl = "http://localhost:".concat(ports.app);
    var s3 = "http://127.0.0.1:".concat(ports.s3);
    return {
        DATABASE_URL: "postgres://".concat(exports.PG_USER, ":").concat(secrets.PG_PASSWORD, "@127.0.0.1:").concat(ports.pg, "/").concat(exports.DB_NAME),
        AUTH_SECRET: secrets.AUTH_SECRET,
        AUTH_TRUST_HOST: "true",
        AUTH_URL: appUrl,
        APP_URL: appUrl,
        TOKEN_SECRET: secrets.TOKEN_SECRET,
        S3_ENDPOINT: s3,
        S3_PUBLIC_ENDPOINT: s3,
        S3_REGION: "us-east-1",
        S3_BUCKET: exports.BUCKET,
        S3_ACCESS_KEY_ID: secrets.S3_ACCESS_KEY_ID,
        S3_SECRET_ACCESS_KEY: secrets.S3_SECRET_ACCESS_KEY,
        S3_FORCE_PATH_STYLE: "true",
        RESEND_BASE_URL: "http://127.0.0.1:".concat(ports.mail),
        RESEND_API_KEY: "re_local_fake",
        MAIL_FROM: "Bandcross <alerts@bandcross.local>",
        MAIL_OUTBOX_DIR: node_path_1.default.join(node_path_1.default.resolve(opts.dataDir), "mail"),
        PORT: String(ports.app),
        NODE_ENV: opts.nodeEnv,
    };
}
/** KEY='value' lines: readable by `node --env-file`, dotenv, and `set -a; . file; set +a` in bash. */
function formatEnvFile(env, header) {
    var quote = function (v) { return "'".concat(v.replace(/'/g, "'\\''"), "'"); };
    var lines = Object.entries(env).map(function (_a) {
        var k = _a[0], v = _a[1];
        return "".concat(k, "=").concat(/^[A-Za-z0-9_./:@-]*$/.test(v) ? v : quote(v));
    });
    return "".concat(header
        .split("\n")
        .map(function (l) { return "# ".concat(l).trimEnd(); })
        .join("\n"), "\n").concat(lines.join("\n"), "\n");
}
function writeEnvFile(file, env, header) {
    node_fs_1.default.writeFileSync(file, formatEnvFile(env, header), { mode: 384 });
}
