"use client";

import { createColumnHelper, type ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import { FlagBadges } from "@/components/review/quality-flags";
import { Badge } from "@/components/ui/badge";
import { formatGap } from "@/lib/format";
import { EditableCell, type EditKey, type Parsed, type Row } from "./spectra-cells";
import { spectrumIndex } from "@/lib/format";

/** How a column's header and cells are dressed; sortable columns' ids are the server's sort keys. */
export interface ColumnLook {
  /** The header's unit, in brackets after its label. */
  unit?: string;
  /** A header that is not a sort button still shows its unit (the setpoint bias). */
  plainUnit?: string;
  /** Classes of the column's cells, besides the padding. */
  cell?: string;
  /** The header cell's classes instead of the usual. */
  head?: string;
  testId?: string;
}

const col = createColumnHelper<Row>();

/** The file and index (and a label that says more than "spectrum …"), linked to the review page. */
function SpectrumName({ lab, r }: { lab: string; r: Row }) {
  const label = r.label && !r.label.startsWith("spectrum") ? ` · ${r.label}` : "";
  return (
    <>
      <Link href={`/labs/${lab}/spectra/${r.id}`} className="font-medium hover:underline">
        {r.sourceName}
      </Link>
      <span className="num text-xs text-muted">
        {" "}
        {spectrumIndex(r.index)}
        {label}
      </span>
    </>
  );
}

/**
 * The session's spectra table's columns: selection (for those who may edit), the spectrum, the
 * editable tags, field, gap, how the pick was made and its quality flags. Sorting happens on the
 * server, by the column's id.
 */
export function spectraColumns(o: {
  lab: string;
  canEdit: boolean;
  onSave: (ids: string[], field: EditKey, parsed: Parsed) => Promise<void>;
}): ColumnDef<Row, unknown>[] {
  const { lab, canEdit, onSave } = o;
  const editable = (id: string, field: EditKey, header: string, look: ColumnLook = {}, sortable = true) =>
    col.display({
      id,
      header,
      enableSorting: sortable,
      meta: look,
      cell: ({ row }) => <EditableCell row={row.original} field={field} canEdit={canEdit} onSave={onSave} />,
    });
  const select = col.display({
    id: "select",
    enableSorting: false,
    meta: { head: "w-8 px-3 py-2" } satisfies ColumnLook,
    header: ({ table }) => (
      <input
        type="checkbox"
        aria-label="Select all on this page"
        checked={table.getIsAllPageRowsSelected()}
        onChange={() => table.toggleAllPageRowsSelected(!table.getIsAllPageRowsSelected())}
      />
    ),
    cell: ({ row }) => (
      <input
        type="checkbox"
        aria-label={`Select ${row.original.label}`}
        checked={row.getIsSelected()}
        onChange={row.getToggleSelectedHandler()}
      />
    ),
  });
  const field = (r: Row) =>
    r.field_V_per_nm == null ? (
      <span className="text-muted" title="No setpoint: no distance or field">
        —
      </span>
    ) : (
      `${r.field_V_per_nm.toFixed(3)} ± ${(r.fieldSigma_V_per_nm ?? 0).toFixed(3)}`
    );
  const pick = (r: Row) =>
    r.excluded ? (
      <Badge tone="danger">excluded</Badge>
    ) : r.source === "corrected" ? (
      <Badge tone="copper">✎ corrected</Badge>
    ) : (
      <Badge>auto</Badge>
    );
  return [
    ...(canEdit ? [select] : []),
    col.display({ id: "index", header: "Spectrum", cell: ({ row }) => <SpectrumName lab={lab} r={row.original} /> }),
    editable("region", "region", "Region"),
    editable("setpointBias", "setpointBias_V", "V set", { plainUnit: "V" }, false),
    editable("setpointCurrent", "setpointCurrent_A", "I set", { unit: "pA" }),
    editable("zOffset", "zOffset_pm", "Δz", { unit: "pm" }),
    col.display({
      id: "field",
      header: "Field",
      meta: { unit: "V/nm", cell: "num" } satisfies ColumnLook,
      cell: ({ row }) => field(row.original),
    }),
    col.display({
      id: "gap",
      header: "Gap",
      meta: { cell: "num" } satisfies ColumnLook,
      cell: ({ row }) =>
        row.original.pickStatus === "no-gap" ? "no gap" : formatGap(row.original.gap_eV, row.original.closed),
    }),
    col.display({ id: "pick", header: "Pick", enableSorting: false, cell: ({ row }) => pick(row.original) }),
    col.display({
      id: "flags",
      header: "Flags",
      enableSorting: false,
      meta: { testId: "spectrum-flags" } satisfies ColumnLook,
      cell: ({ row }) =>
        row.original.flags?.length ? <FlagBadges flags={row.original.flags} /> : <span className="text-muted">—</span>,
    }),
  ];
}
