"use client";

import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import {
  flexRender,
  getCoreRowModel,
  type RowSelectionState,
  type SortingState,
  useReactTable,
} from "@tanstack/react-table";
import { type ReactNode, useState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { api, ApiError } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import { EDITABLE, type EditKey, type Parsed, type Patch, type Sort, type SpectraPage } from "./spectra-cells";
import { type ColumnLook, spectraColumns } from "./spectra-columns";
import { SpectraHead } from "./spectra-head";
import { type Bulk, BulkBar, type Filters, SpectraFilters } from "./spectra-toolbar";
import { useAverage } from "./use-average";

const PAGE_SIZE = 50;

/** A full-width row of the table's body: loading, an error with a retry, or why there are no rows. */
function BodyNote({ span, children, className }: { span: number; children: ReactNode; className: string }) {
  return (
    <tr>
      <td colSpan={span} className={className}>
        {children}
      </td>
    </tr>
  );
}

/**
 * A session's spectra, for tagging: a TanStack table whose sorting and paging the server does
 * (`manualSorting`, `manualPagination`: the query asks for one sorted page), with filters, cells
 * edited in place, and one value set for every selected spectrum (the selection, kept by id,
 * survives paging).
 */
export function SpectraTable(props: {
  lab: string;
  sessionId: string;
  sampleId: string;
  canEdit: boolean;
  tips: { id: string; label: string }[];
}) {
  const { lab, sessionId, sampleId, canEdit, tips } = props;
  const qc = useQueryClient();
  const [page, setPage] = useState(1);
  const [sorting, setSorting] = useState<SortingState>([{ id: "index", desc: false }]);
  /** Flag: "" all, "flagged", "unflagged", or a flag's code: filtered on the server, like the rest. */
  const [filters, setFilters] = useState<Filters>({ q: "", region: "", flag: "" });
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [bulk, setBulk] = useState<Bulk>({ field: "region", value: "" });
  const [error, setError] = useState<string | null>(null);
  const { average, averaging, notice } = useAverage({ lab, sessionId, sampleId, onError: setError });
  const sort = sorting[0]?.id as Sort;
  const dir = sorting[0]?.desc ? "desc" : "asc";
  const { q, region, flag } = filters;
  const params = { page, sort, dir, q, region, flag };
  const search = new URLSearchParams({
    page: String(page),
    pageSize: String(PAGE_SIZE),
    sort,
    dir,
    ...(q ? { q } : {}),
    ...(region ? { region } : {}),
    ...(flag ? { flag } : {}),
  });
  const { data, isLoading, isError, refetch } = useQuery({
    queryKey: queryKeys.sessionSpectra(sessionId, params),
    queryFn: () => api<SpectraPage>(lab, "GET", `/sessions/${sessionId}/spectra?${search}`),
    placeholderData: keepPreviousData,
    refetchInterval: 5000,
  });
  const tag = useMutation({
    mutationFn: (v: { ids: string[]; patch: Patch }) => api(lab, "PATCH", "/spectra/tags", v),
    onSuccess: () => {
      setError(null);
      void qc.invalidateQueries({ queryKey: queryKeys.sessionSpectra(sessionId) });
      void qc.invalidateQueries({ queryKey: queryKeys.phase(sampleId) });
    },
    onError: (e) => setError(e instanceof ApiError ? e.message : "The change was not saved."),
  });
  const send = async (ids: string[], patch: Patch) => {
    await tag.mutateAsync({ ids, patch }).catch(() => undefined);
  };
  /** A typed value: sent when it reads as one, otherwise the reason is shown and nothing changes. */
  const save = async (ids: string[], field: EditKey, parsed: Parsed) => {
    if ("error" in parsed) setError(parsed.error);
    else await send(ids, { [field]: parsed.value });
  };
  const columns = spectraColumns({ lab, canEdit, onSave: save });
  const rows = data?.rows ?? [];
  const pages = data ? Math.max(1, Math.ceil(data.total / PAGE_SIZE)) : 1;
  const table = useReactTable({
    data: rows,
    columns,
    getRowId: (r) => r.id,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    pageCount: pages,
    // A header click sorts by its column, ascending first, and a second click reverses it.
    enableMultiSort: false,
    enableSortingRemoval: false,
    sortDescFirst: false,
    enableRowSelection: canEdit,
    state: { sorting, rowSelection: selection, pagination: { pageIndex: page - 1, pageSize: PAGE_SIZE } },
    onSortingChange: (next) => {
      setSorting(next);
      setPage(1);
    },
    onRowSelectionChange: setSelection,
  });
  const selected = Object.keys(selection).filter((id) => selection[id]);
  const span = columns.length;

  const applyBulk = async () => {
    if (!selected.length) return;
    if (bulk.field === "tipId") await send(selected, { tipId: bulk.value || null });
    else await save(selected, bulk.field, EDITABLE[bulk.field].parse(bulk.value));
  };

  return (
    <div className="space-y-3" data-testid="spectra-table">
      <SpectraFilters
        filters={filters}
        onChange={(f) => {
          setFilters(f);
          setPage(1);
        }}
        regions={data?.regions ?? []}
        total={data ? data.total : null}
      />
      {canEdit && selected.length > 0 ? (
        <BulkBar
          count={selected.length}
          bulk={bulk}
          onChange={setBulk}
          tips={tips}
          saving={tag.isPending}
          onApply={applyBulk}
          onClear={() => setSelection({})}
          onAverage={() => average(selected)}
          averaging={averaging}
        />
      ) : null}
      {error ? <Notice tone="danger">{error}</Notice> : null}
      {notice}
      <div className="overflow-x-auto rounded-lg border border-line bg-card">
        <table className="w-full min-w-[980px] text-left text-sm">
          <SpectraHead table={table} />
          <tbody>
            {isLoading ? (
              Array.from({ length: 5 }, (_, i) => (
                <tr key={i} className="border-b border-line/70">
                  <td colSpan={span} className="px-3 py-3">
                    <div className="h-3 w-2/3 animate-pulse rounded bg-line" />
                  </td>
                </tr>
              ))
            ) : isError ? (
              <BodyNote span={span} className="px-3 py-6 text-center text-sm text-danger">
                The spectra could not be loaded.{" "}
                <button type="button" className="underline" onClick={() => refetch()}>
                  Retry
                </button>
              </BodyNote>
            ) : rows.length === 0 ? (
              <BodyNote span={span} className="px-3 py-6 text-center text-sm text-muted">
                {q || region || flag ? "No spectra match the filter." : "No spectra yet: drop files above."}
              </BodyNote>
            ) : (
              table.getRowModel().rows.map((row) => (
                <tr
                  key={row.id}
                  className="border-b border-line/70 last:border-0 hover:bg-paper/60"
                  data-testid="spectrum-row"
                >
                  {row.getVisibleCells().map((cell) => {
                    const look = (cell.column.columnDef.meta ?? {}) as ColumnLook;
                    return (
                      <td
                        key={cell.id}
                        className={`${look.cell ? `${look.cell} ` : ""}px-3 py-1.5`}
                        data-testid={look.testId}
                      >
                        {flexRender(cell.column.columnDef.cell, cell.getContext())}
                      </td>
                    );
                  })}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      <div className="flex items-center justify-end gap-2 text-sm">
        <Button
          type="button"
          variant="secondary"
          className="py-1"
          disabled={page <= 1}
          onClick={() => setPage(page - 1)}
        >
          Previous
        </Button>
        <span className="num text-xs text-muted">
          page {page} of {pages}
        </span>
        <Button
          type="button"
          variant="secondary"
          className="py-1"
          disabled={page >= pages}
          onClick={() => setPage(page + 1)}
        >
          Next
        </Button>
      </div>
    </div>
  );
}
