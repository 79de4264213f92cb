"use strict";
// Counting test results across several vitest runs, for the last line of `npm test`.
Object.defineProperty(exports, "__esModule", { value: true });
exports.stripAnsi = exports.zero = void 0;
exports.add = add;
exports.parseVitestText = parseVitestText;
exports.parseVitestJson = parseVitestJson;
exports.formatSteps = formatSteps;
exports.formatTotals = formatTotals;
var zero = function () { return ({ passed: 0, failed: 0, skipped: 0 }); };
exports.zero = zero;
function add(a, b) {
    return { passed: a.passed + b.passed, failed: a.failed + b.failed, skipped: a.skipped + b.skipped };
}
// eslint-disable-next-line no-control-regex
var ANSI = /\x1b\[[0-9;?]*[ -/]*[@-~]/g;
var stripAnsi = function (s) { return s.replace(ANSI, ""); };
exports.stripAnsi = stripAnsi;
/**
 * Parse vitest's text summary, e.g.
 *   " Tests  3 failed | 40 passed | 2 skipped (45)"
 * Returns null when no "Tests" summary line is present (vitest crashed, or found no test files).
 * When several summary lines are present the last one wins.
 */
function parseVitestText(output) {
    var found = null;
    for (var _i = 0, _a = (0, exports.stripAnsi)(output).split(/\r?\n/); _i < _a.length; _i++) {
        var rawLine = _a[_i];
        var m = /^\s*Tests\s+(.*)$/.exec(rawLine);
        if (!m)
            continue;
        var body = m[1];
        if (!/\d+\s+(passed|failed|skipped|todo)/.test(body))
            continue;
        var counts = (0, exports.zero)();
        for (var _b = 0, _c = body.replace(/\(\d+\)\s*$/, "").split("|"); _b < _c.length; _b++) {
            var part = _c[_b];
            var pm = /(\d+)\s+(passed|failed|skipped|todo)/.exec(part);
            if (!pm)
                continue;
            var n = Number(pm[1]);
            if (pm[2] === "passed")
                counts.passed += n;
            else if (pm[2] === "failed")
                counts.failed += n;
            else
                counts.skipped += n;
        }
        found = counts;
    }
    return found;
}
/** Counts from vitest's JSON reporter output (the jest-compatible shape). */
function parseVitestJson(json) {
    var _a, _b;
    if (!json || typeof json !== "object")
        return null;
    var j = json;
    var num = function (k) { return (typeof j[k] === "number" ? j[k] : null); };
    var passed = num("numPassedTests");
    var failed = num("numFailedTests");
    if (passed === null || failed === null)
        return null;
    return { passed: passed, failed: failed, skipped: ((_a = num("numPendingTests")) !== null && _a !== void 0 ? _a : 0) + ((_b = num("numTodoTests")) !== null && _b !== void 0 ? _b : 0) };
}
/** "bandcross test: unit ok, integration FAILED (exit 1), build ok, e2e ok" */
function formatSteps(steps) {
    return ("bandcross test: " +
        steps.map(function (s) { return "".concat(s.name, " ").concat(s.ok ? "ok" : "FAILED").concat(s.note ? " (".concat(s.note, ")") : ""); }).join(", "));
}
/** The very last line, exactly "N passed, N failed" (skipped tests are reported on the line before). */
function formatTotals(c) {
    return "".concat(c.passed, " passed, ").concat(c.failed, " failed");
}
