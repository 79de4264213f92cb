"use client";

import { useQueryClient } from "@tanstack/react-query";
import { useState, type FormEvent } from "react";
import { Notice } from "@/components/ui/card";
import { api, ApiError } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import { RunProgress } from "./run-progress";
import { followRun, RUN_ACTIVE, useSampleVersions, type SampleVersions } from "./sample-queries";
import { ReadOnlyVersions } from "./settings-facts";
import { fieldModelBody, settingsBody } from "./settings-bodies";
import { ExtractionSettingsForm, FieldModelForm } from "./settings-forms";

/**
 * Editors of a sample's extraction settings and field model. Saving makes a new version; the
 * automatic picks nobody corrected by hand and every field estimate are re-run in the background.
 */
export function SettingsEditors({
  lab,
  sampleId,
  canEdit,
  initial,
}: {
  lab: string;
  sampleId: string;
  canEdit: boolean;
  initial: SampleVersions;
}) {
  const qc = useQueryClient();
  const data = useSampleVersions(lab, sampleId, initial);
  const [msg, setMsg] = useState<{
    tone: "ok" | "danger";
    text: string;
    fields?: Record<string, string[]>;
    runId?: string;
  } | null>(null);
  // "Being re-analysed" holds only until that run has ended; then the progress line says it finished.
  const shownMsg = msg && !(msg.runId && data.run?.id === msg.runId && !RUN_ACTIVE.has(data.run.status)) ? msg : null;

  async function save(kind: "settings" | "field", e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    try {
      const saved: { runId?: string } =
        kind === "settings"
          ? await api(lab, "PUT", `/samples/${sampleId}/extraction-settings`, settingsBody(f))
          : await api(lab, "PUT", `/samples/${sampleId}/field-model`, fieldModelBody(f));
      followRun(saved.runId);
      setMsg({ tone: "ok", text: "Saved as a new version; the sample is being re-analysed.", runId: saved.runId });
      await qc.invalidateQueries({ queryKey: queryKeys.sampleVersions(sampleId) });
    } catch (err) {
      const fields = err instanceof ApiError ? err.body?.error?.fields : undefined;
      // With marked fields the banner need not repeat them by their API names.
      const text =
        fields && Object.keys(fields).length
          ? "Not saved: correct the marked values."
          : err instanceof ApiError
            ? err.message
            : "Not saved.";
      setMsg({ tone: "danger", text, fields });
    }
  }

  const fe = (k: string) => msg?.fields?.[k];
  if (!canEdit) return <ReadOnlyVersions data={data} />;
  return (
    <div className="space-y-5" data-testid="settings-editors">
      <RunProgress run={data.run} />
      {shownMsg ? <Notice tone={shownMsg.tone}>{shownMsg.text}</Notice> : null}
      <ExtractionSettingsForm data={data} fe={fe} onSubmit={(e) => save("settings", e)} />
      <FieldModelForm data={data} fe={fe} onSubmit={(e) => save("field", e)} />
    </div>
  );
}
