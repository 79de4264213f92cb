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
