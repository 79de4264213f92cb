import "server-only";
import { and, eq, inArray, ne, sql } from "drizzle-orm";
import type { SystemCtx } from "@/lib/base/context";
import { approachCurves, gapPicks, measurementSessions, spectra, tips, uploads } from "@/db/schema";
import { sha256Hex } from "@/lib/auth/secrets";
import { importUpload, pointGroups, PrepareError, type ImportedFile, type ParsedSpectrum } from "@/lib/spectra";
import { isServiceError } from "@/lib/base/errors";
import { getObjectBytes } from "@/lib/storage/s3";
import { analyzeSpectrum, pickColumns, repeatFlags } from "../analysis/analyzeSpectrum";
import { refitSample } from "../analysis/refitSample";
import { loadSampleAnalysis } from "../analysis/loadSampleAnalysis";
import { storeAverage } from "../analysis/storeAverage";
import { ProcessOutcome, curveFitColumns, fail } from "./shared";

const INSERT_BATCH = 400;

/** The points of a file with two repeats or more (`# repeats: N` or `point=K` columns), or why they cannot be read. */
function repeatPoints(f: ImportedFile): { label: string; members: ParsedSpectrum[] }[] | string {
  try {
    const g = pointGroups(f.spectra);
    return g.groups.filter((p) => p.members.length > 1).map((p) => ({ label: p.label, members: p.members.map((i) => f.spectra.find((s) => s.index === i)!) }));
  } catch (e) {
    if (e instanceof PrepareError) return e.message;
    throw e;
  }
}

/**
 * The worker's job for one raw file: read it from storage, parse it with the analysis core, store
 * its spectra with their automatic picks and field estimates, and its I(z) curves with the fit of
 * their decay constant (a file or zip entry is one or the other by its columns), and refit the sample. A file's
 * spectra are stored in one transaction or not at all; running it again (a retry after a crash)
 * replaces what an unfinished earlier run stored, and a run that finds the file stored by another
 * meanwhile leaves it as it is. A file that cannot be read is marked failed with the
 * parser's message; its raw bytes stay in storage. Infrastructure errors (storage or database
 * unreachable) are thrown, so the queue retries with backoff.
 */
export async function processUpload({ ctx, input }: { ctx: SystemCtx; input: { uploadId: string } }): Promise<ProcessOutcome> {
  const { db, faults = {} } = ctx;
  const { uploadId } = input;
  const [u] = await db.select().from(uploads).where(eq(uploads.id, uploadId));
  if (!u) return { status: "skipped", reason: "no such upload" };
  if (u.status === "done") return { status: "skipped", reason: "already done" };
  await faults.afterRead?.();
  // Marked in flight only while not done: a plain write here, from a run that read the row just
  // before another run stored the file, turned "done" back into "processing" and the file was
  // stored a second time under new ids.
  const [claimed] = await db
    .update(uploads)
    .set({ status: "processing", attempts: sql`${uploads.attempts} + 1`, updatedAt: new Date() })
    .where(and(eq(uploads.id, u.id), ne(uploads.status, "done")))
    .returning({ id: uploads.id });
  if (!claimed) return { status: "skipped", reason: "already done by another run" };

  const bytes = await getObjectBytes(u.storageKey);
  if (sha256Hex(bytes) !== u.sha256) {
    // Checked at completion, so storage itself changed them. The row holds no file: the genuine
    // file may be sent again under it (createUploads), instead of being taken for a duplicate.
    await db.update(uploads).set({ hashMismatch: true }).where(and(eq(uploads.id, u.id), ne(uploads.status, "done")));
    const message =
      "The stored bytes do not match the file's SHA-256: the stored copy was damaged. Upload the file again.";
    return fail(db, u.id, message);
  }
  const { spectra: files, curves: curveFiles } = importUpload(u.fileName, bytes);
  await faults.afterParse?.();
  const good = files.filter((f) => f.status === "ok" && f.spectra.length > 0);
  const goodCurves = curveFiles.filter((f) => f.status === "ok" && f.curves.length > 0);
  const bad = [...files, ...curveFiles].filter((f) => f.status === "error");
  if (good.length === 0 && goodCurves.length === 0) {
    const message = bad.length === 1 ? (bad[0].message ?? "The file could not be read.") : bad.map((f) => `${f.file}: ${f.message}`).join("\n");
    return fail(db, u.id, message || "The file holds no spectra.");
  }

  const [session] = await db.select().from(measurementSessions).where(eq(measurementSessions.id, u.sessionId));
  const analysis = await loadSampleAnalysis({ ctx, input: { sampleId: session.sampleId } });
  const [tip] = session.tipId ? await db.select().from(tips).where(eq(tips.id, session.tipId)) : [];
  const model = analysis.modelFor(tip ?? null);

  const read = [...files, ...curveFiles];
  const warnings = [...read.flatMap((f) => f.warnings.map((w) => (read.length > 1 ? `${f.file}: ${w}` : w))), ...bad.map((f) => `${f.file} skipped: ${f.message}`)];
  // I(z) curves: each fitted for κ; one that cannot be fitted is kept with the fit's message.
  const curves = goodCurves.flatMap((f) => f.curves).map((c) => ({ c, fit: curveFitColumns(c) }));
  const unfitted = curves.filter((x) => x.fit.fitStatus === "error");
  for (const x of unfitted.slice(0, 20)) warnings.push(`${x.c.file} (${x.c.label}): no κ: ${x.fit.fitMessage}`);
  const all: ParsedSpectrum[] = good.flatMap((f) => f.spectra);
  const prepared = all.map((s) => {
    const { meta, pick, view, field } = analyzeSpectrum(s, { settings: analysis.settings, model, sessionTemperatureK: session.temperatureK });
    const spectrumWarnings = [...s.warnings, ...pick.warnings, ...(field.warning ? [field.warning] : [])];
    return { s, meta, pick, view, field, spectrumWarnings };
  });
  // Repeats at one point in a file are compared: a tip change or drift between them is flagged.
  repeatFlags(prepared.map((p) => ({ file: p.s.file, meta: p.meta, bias_V: p.s.bias_V, didv: p.s.didv, pick: p.pick }))).forEach((f, i) => prepared[i].pick.flags.push(...f));
  const noSetpoint = prepared.filter((p) => p.field.fieldVPerNm == null).length;
  if (noSetpoint) warnings.push(`${noSetpoint} of ${prepared.length} spectra have no field estimate (no setpoint in the file): tag their setpoint to place them on the phase plot.`);

  const stored = await db.transaction(async (tx) => {
    // Another run of the same file (a job retried after its lease ran out while the first was
    // still working, on another worker) may have stored it meanwhile: the row lock makes the
    // runs take turns, and the later one keeps what the first stored (its spectra's ids, and any
    // correction made since) instead of replacing it.
    const [now] = await tx.select({ status: uploads.status }).from(uploads).where(eq(uploads.id, u.id)).for("update");
    if (!now || now.status === "done") return false;
    const old = await tx.select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, u.id));
    if (old.length) await tx.delete(spectra).where(inArray(spectra.id, old.map((o) => o.id)));
    await tx.delete(approachCurves).where(eq(approachCurves.uploadId, u.id));
    for (let i = 0; i < curves.length; i += INSERT_BATCH)
      await tx.insert(approachCurves).values(
        curves.slice(i, i + INSERT_BATCH).map(({ c, fit }) => ({
          labId: u.labId,
          uploadId: u.id,
          sessionId: u.sessionId,
          sampleId: session.sampleId,
          tipId: session.tipId,
          sourceName: c.file,
          indexInFile: c.index,
          label: c.label,
          rawSha256: u.sha256,
          nPoints: c.z_nm.length,
          zNm: c.z_nm,
          currentA: c.current_A,
          setpointBiasV: c.meta.setpoint_bias_V ?? null,
          setpointCurrentA: c.meta.setpoint_current_A ?? null,
          temperatureK: c.meta.temperature_K ?? session.temperatureK ?? null,
          meta: c.meta.extra,
          ...fit,
        })),
      );
    const idOf = new Map<ParsedSpectrum, string>();
    for (let i = 0; i < prepared.length; i += INSERT_BATCH) {
      const batch = prepared.slice(i, i + INSERT_BATCH);
      const rows = await tx
        .insert(spectra)
        .values(
          batch.map(({ s, meta, field, spectrumWarnings }) => ({
            labId: u.labId,
            uploadId: u.id,
            sessionId: u.sessionId,
            sampleId: session.sampleId,
            tipId: session.tipId,
            sourceName: s.file,
            indexInFile: s.index,
            label: s.label,
            rawSha256: u.sha256,
            nPoints: s.bias_V.length,
            biasV: s.bias_V,
            didv: s.didv,
            currentA: s.current_A,
            setpointBiasV: meta.setpoint_bias_V ?? null,
            setpointCurrentA: meta.setpoint_current_A ?? null,
            zOffsetPm: meta.z_offset_pm ?? null,
            lockinModulationMvRms: meta.lockin_modulation_mV_rms ?? null,
            temperatureK: meta.temperature_K ?? null,
            xNm: meta.x_nm ?? null,
            yNm: meta.y_nm ?? null,
            region: meta.region ?? null,
            meta: meta.extra,
            warnings: spectrumWarnings,
            ...field,
            fieldModelVersionId: analysis.fieldVersion.id,
          })),
        )
        .returning({ id: spectra.id });
      await tx.insert(gapPicks).values(batch.map((p, j) => ({ labId: u.labId, spectrumId: rows[j].id, ...pickColumns(p.pick, analysis.settingsVersion.id, p.view) })));
      batch.forEach((p, j) => idOf.set(p.s, rows[j].id));
    }
    // Repeats of one point are averaged (the repeats are kept as they are); a point that cannot be
    // averaged is said so in the file's warnings and its repeats stay separate spectra.
    for (const f of good) {
      const points = repeatPoints(f);
      if (typeof points === "string") {
        warnings.push(`${f.file}: repeats not averaged: ${points}`);
        continue;
      }
      for (const p of points)
        try {
          const memberIds = p.members.map((m) => idOf.get(m)!);
          const a = await storeAverage({ ctx: { db: tx }, input: { memberIds, createdBy: u.createdBy } });
          warnings.push(`${f.file}: ${p.label}: ${p.members.length} repeats averaged${a.leftOut.length ? `, ${a.leftOut.length} left out (differs beyond the noise)` : ""}`);
        } catch (e) {
          if (!isServiceError(e)) throw e;
          warnings.push(`${f.file}: ${p.label}: ${e.message}`);
        }
    }
    await tx
      .update(uploads)
      .set({ status: "done", message: null, spectraCount: prepared.length, curvesCount: curves.length, warnings: warnings.slice(0, 200), updatedAt: new Date() })
      .where(eq(uploads.id, u.id));
    return true;
  });
  if (!stored) return { status: "skipped", reason: "already done by another run" };
  const refit = await refitSample({ ctx, input: { sampleId: session.sampleId } });
  return { status: "done", spectra: prepared.length, curves: curves.length, refit };
}
