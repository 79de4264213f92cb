"use client";

import { flexRender, type Table } from "@tanstack/react-table";
import type { Row } from "./spectra-cells";
import type { ColumnLook } from "./spectra-columns";

/**
 * The spectra table's header: a sort button for each sortable column (the server sorts; the
 * arrow shows the current order), the setpoint bias with its unit, and the page's select-all box.
 */
export function SpectraHead({ table }: { table: Table<Row> }) {
  return (
    <thead className="bg-paper/70 text-xs uppercase tracking-wide text-muted">
      {table.getHeaderGroups().map((hg) => (
        <tr key={hg.id}>
          {hg.headers.map((h) => {
            const look = (h.column.columnDef.meta ?? {}) as ColumnLook;
            const sorted = h.column.getIsSorted();
            const label = flexRender(h.column.columnDef.header, h.getContext());
            if (look.head)
              return (
                <th key={h.id} className={look.head}>
                  {label}
                </th>
              );
            return (
              <th
                key={h.id}
                scope="col"
                className="px-3 py-2 font-semibold"
                aria-sort={sorted ? (sorted === "asc" ? "ascending" : "descending") : undefined}
              >
                {h.column.getCanSort() ? (
                  <button
                    type="button"
                    className="inline-flex items-center gap-1 uppercase tracking-wide hover:text-ink"
                    onClick={h.column.getToggleSortingHandler()}
                  >
                    {label}
                    {look.unit ? <span className="normal-case text-muted">({look.unit})</span> : null}
                    <span aria-hidden className="text-[10px]">
                      {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
                    </span>
                  </button>
                ) : (
                  <>
                    {label}
                    {look.plainUnit ? (
                      <>
                        {" "}
                        <span className="normal-case">({look.plainUnit})</span>
                      </>
                    ) : null}
                  </>
                )}
              </th>
            );
          })}
        </tr>
      ))}
    </thead>
  );
}
