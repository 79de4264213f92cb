"use client";

import type { ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import { DataTable } from "@/components/ui/data-table";

type TipRow = {
  id: string;
  label: string;
  material: string;
  workFunctionEv: number;
  workFunctionSigmaEv: number;
  preparedOn: string | null;
  /** κ from the tip's I(z) curves, one line per sample it was measured on. */
  kappas: string[];
};

export function TipsTable({ lab, tips, canWrite }: { lab: string; tips: TipRow[]; canWrite: boolean }) {
  const columns: ColumnDef<TipRow>[] = [
    {
      accessorKey: "label",
      header: "Tip",
      cell: ({ row }) =>
        canWrite ? (
          <Link className="font-medium hover:underline" href={`/labs/${lab}/tips/${row.original.id}/edit`}>
            {row.original.label}
          </Link>
        ) : (
          <span className="font-medium">{row.original.label}</span>
        ),
    },
    { accessorKey: "material", header: "Material" },
    {
      accessorKey: "workFunctionEv",
      header: "Work function",
      enableGlobalFilter: false,
      cell: ({ row }) => (
        <span className="num">
          {row.original.workFunctionEv.toFixed(2)} ± {row.original.workFunctionSigmaEv.toFixed(2)} eV
        </span>
      ),
    },
    {
      id: "kappa",
      header: "κ from I(z) curves",
      enableSorting: false,
      accessorFn: (t) => t.kappas.join("; "),
      cell: ({ row }) =>
        row.original.kappas.length ? (
          <ul className="num text-xs" data-testid="tip-kappa">
            {row.original.kappas.map((k) => (
              <li key={k}>{k}</li>
            ))}
          </ul>
        ) : (
          <span className="text-muted">—</span>
        ),
    },
    {
      accessorKey: "preparedOn",
      header: "Prepared",
      sortUndefined: "last",
      cell: ({ getValue }) => <span className="num">{getValue<string | null>() ?? "—"}</span>,
    },
  ];
  return (
    <DataTable
      data={tips}
      columns={columns}
      filterPlaceholder="Filter tips"
      testId="tips-table"
      empty="No tips yet: add the probe you measure with."
    />
  );
}
