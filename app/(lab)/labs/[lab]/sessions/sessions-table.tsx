"use client";

import type { ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import { DataTable } from "@/components/ui/data-table";

type Row = {
  id: string;
  label: string;
  date: string;
  sampleName: string;
  tipLabel: string | null;
  temperatureK: number | null;
  operatorName: string | null;
  spectraCount: number;
};

export function SessionsTable({ lab, sessions }: { lab: string; sessions: Row[] }) {
  const columns: ColumnDef<Row>[] = [
    {
      accessorKey: "label",
      header: "Session",
      cell: ({ row }) => (
        <Link className="font-medium hover:underline" href={`/labs/${lab}/sessions/${row.original.id}`}>
          {row.original.label}
        </Link>
      ),
    },
    { accessorKey: "date", header: "Date", cell: ({ getValue }) => <span className="num">{getValue<string>()}</span> },
    { accessorKey: "sampleName", header: "Sample" },
    { accessorKey: "tipLabel", header: "Tip", cell: ({ getValue }) => getValue<string | null>() ?? "—" },
    {
      accessorKey: "temperatureK",
      header: "T",
      enableGlobalFilter: false,
      cell: ({ getValue }) => (
        <span className="num">{getValue<number | null>() != null ? `${getValue<number>()} K` : "—"}</span>
      ),
    },
    { accessorKey: "operatorName", header: "Operator", cell: ({ getValue }) => getValue<string | null>() ?? "—" },
    {
      accessorKey: "spectraCount",
      header: "Spectra",
      enableGlobalFilter: false,
      cell: ({ getValue }) => <span className="num">{getValue<number>()}</span>,
    },
  ];
  return (
    <DataTable
      data={sessions}
      columns={columns}
      filterPlaceholder="Filter sessions"
      testId="sessions-table"
      initialSort={[{ id: "date", desc: true }]}
      empty="No sessions yet."
    />
  );
}
