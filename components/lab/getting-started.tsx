import Link from "next/link";

const NEXT_STEP = "border-copper/50 bg-copper-soft/40";
const STEP_LINK = "font-medium underline-offset-2 hover:underline";

export interface StartSteps {
  tip: boolean;
  sample: boolean;
  session: boolean;
  upload: boolean;
  /** Where files are dropped (the latest session), for those who may upload. */
  uploadSessionId: string | null;
}

/** Which steps the person may take themselves (their role); the others are listed without a link. */
export interface StartAbilities {
  tip: boolean;
  sample: boolean;
  session: boolean;
  upload: boolean;
}

/**
 * A new lab's first steps, in order, each a link, done ones ticked: a tip and a sample with their
 * work functions, a session that joins them, then the session's spectrum files.
 */
export function GettingStarted({ lab, steps, may }: { lab: string; steps: StartSteps; may: StartAbilities }) {
  const base = `/labs/${lab}`;
  const items = [
    {
      key: "tip",
      done: steps.tip,
      may: may.tip,
      href: `${base}/tips/new`,
      title: "Add a tip",
      text: "its material and work function",
    },
    {
      key: "sample",
      done: steps.sample,
      may: may.sample,
      href: `${base}/samples/new`,
      title: "Add a sample",
      text: "the film, its substrate and work function",
    },
    {
      key: "session",
      done: steps.session,
      may: may.session,
      href: `${base}/sessions/new`,
      title: "Create a session",
      text: "a day at the instrument with that sample and tip",
    },
    {
      key: "upload",
      done: steps.upload,
      may: may.upload,
      href: steps.uploadSessionId ? `${base}/sessions/${steps.uploadSessionId}` : `${base}/sessions`,
      title: "Upload spectra",
      text: "drop the session's dI/dV files on its page",
    },
  ] as const;
  const next = items.find((i) => !i.done)?.key;
  return (
    <section
      className="mb-6 rounded-xl border border-line bg-card px-5 py-4"
      data-testid="getting-started"
      aria-labelledby="start-title"
    >
      <h2 id="start-title" className="text-sm font-semibold tracking-wide text-ink">
        First steps in this lab
      </h2>
      <ol className="mt-3 grid gap-2 sm:grid-cols-2 lg:grid-cols-4">
        {items.map((item, i) => (
          <li
            key={item.key}
            data-testid={`start-step-${item.key}`}
            data-done={item.done ? "true" : "false"}
            className={`flex gap-3 rounded-lg border px-3 py-2.5 ${item.key === next ? NEXT_STEP : "border-line"}`}
          >
            <span
              aria-hidden
              className={
                "mt-0.5 flex h-6 w-6 shrink-0 items-center justify-center rounded-full text-xs font-semibold " +
                (item.done ? "bg-ok text-white" : "border border-line text-ink-soft")
              }
            >
              {item.done ? "✓" : i + 1}
            </span>
            <span className="min-w-0 text-sm">
              {item.may ? (
                <Link
                  href={item.href}
                  className={`${STEP_LINK} ${item.done ? "text-ink-soft" : "text-copper"}`}
                >
                  {item.title}
                </Link>
              ) : (
                <span className="font-medium text-ink-soft">{item.title}</span>
              )}
              <span className="sr-only">{item.done ? " (done)" : " (to do)"}</span>
              <span className="block text-xs text-muted">
                {item.may ? item.text : "done by the lab's microscopists or owners"}
              </span>
            </span>
          </li>
        ))}
      </ol>
    </section>
  );
}
