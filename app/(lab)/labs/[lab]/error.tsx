"use client";

import { Button } from "@/components/ui/button";

/** A page of the lab area failed: say so plainly and offer a retry; the error itself is in the server log. */
export default function LabError({ error, reset }: { error: Error & { digest?: string }; reset: () => void }) {
  return (
    <div
      className="mx-auto max-w-lg rounded-xl border border-danger/30 bg-danger-soft/50 px-6 py-8 text-center"
      role="alert"
    >
      <p className="font-medium text-danger">This page could not be loaded.</p>
      <p className="mt-1 text-sm text-ink-soft">
        Nothing you uploaded is lost. Try again; if it keeps failing, give your lab owner this reference:{" "}
        <span className="num">{error.digest ?? "no reference"}</span>.
      </p>
      <div className="mt-4 flex justify-center">
        <Button type="button" onClick={reset}>
          Try again
        </Button>
      </div>
    </div>
  );
}
