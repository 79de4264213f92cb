// Counting test results across several vitest runs, for the last line of `npm test`.

export interface Counts {
  passed: number;
  failed: number;
  skipped: number;
}

export const zero = (): Counts => ({ passed: 0, failed: 0, skipped: 0 });

export function add(a: Counts, b: Counts): Counts {
  return { passed: a.passed + b.passed, failed: a.failed + b.failed, skipped: a.skipped + b.skipped };
}

// eslint-disable-next-line no-control-regex
const ANSI = /\x1b\[[0-9;?]*[ -/]*[@-~]/g;

export const stripAnsi = (s: string) => s.replace(ANSI, "");

/**
 * Parse vitest's text summary, e.g.
 *   " Tests  3 failed | 40 passed | 2 skipped (45)"
 * Returns null when no "Tests" summary line is present (vitest crashed, or found no test files).
 * When several summary lines are present the last one wins.
 */
export function parseVitestText(output: string): Counts | null {
  let found: Counts | null = null;
  for (const rawLine of stripAnsi(output).split(/\r?\n/)) {
    const m = /^\s*Tests\s+(.*)$/.exec(rawLine);
    if (!m) continue;
    const body = m[1]!;
    if (!/\d+\s+(passed|failed|skipped|todo)/.test(body)) continue;
    const counts = zero();
    for (const part of body.replace(/\(\d+\)\s*$/, "").split("|")) {
      const pm = /(\d+)\s+(passed|failed|skipped|todo)/.exec(part);
      if (!pm) continue;
      const n = Number(pm[1]);
      if (pm[2] === "passed") counts.passed += n;
      else if (pm[2] === "failed") counts.failed += n;
      else counts.skipped += n;
    }
    found = counts;
  }
  return found;
}

/** Counts from vitest's JSON reporter output (the jest-compatible shape). */
export function parseVitestJson(json: unknown): Counts | null {
  if (!json || typeof json !== "object") return null;
  const j = json as Record<string, unknown>;
  const num = (k: string) => (typeof j[k] === "number" ? (j[k] as number) : null);
  const passed = num("numPassedTests");
  const failed = num("numFailedTests");
  if (passed === null || failed === null) return null;
  return { passed, failed, skipped: (num("numPendingTests") ?? 0) + (num("numTodoTests") ?? 0) };
}

export interface StepResult {
  name: string;
  ok: boolean;
  /** shown after the name, e.g. "12 passed" or "exit 1" or "skipped: build failed" */
  note?: string;
}

/** "bandcross test: unit ok, integration FAILED (exit 1), build ok, e2e ok" */
export function formatSteps(steps: StepResult[]): string {
  return (
    "bandcross test: " +
    steps.map((s) => `${s.name} ${s.ok ? "ok" : "FAILED"}${s.note ? ` (${s.note})` : ""}`).join(", ")
  );
}

/** The very last line, exactly "N passed, N failed" (skipped tests are reported on the line before). */
export function formatTotals(c: Counts): string {
  return `${c.passed} passed, ${c.failed} failed`;
}
