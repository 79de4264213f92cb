"use client";

import type { ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import { CrossingBadge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { formatGap } from "@/lib/format";
import type { SampleSummary } from "@/lib/services/samples/types";

export function SamplesTable({ lab, samples }: { lab: string; samples: SampleSummary[] }) {
  const columns: ColumnDef<SampleSummary>[] = [
    {
      accessorKey: "name",
      header: "Sample",
      cell: ({ row }) => (
        <Link
          href={`/labs/${lab}/samples/${row.original.id}`}
          className="font-medium text-ink underline-offset-2 hover:underline"
        >
          {row.original.name}
        </Link>
      ),
    },
    {
      accessorKey: "material",
      header: "Material",
      cell: ({ row }) => (
        <span>
          {row.original.material}
          {row.original.substrate ? <span className="text-muted"> on {row.original.substrate}</span> : null}
        </span>
      ),
    },
    {
      accessorKey: "spectraCount",
      header: "Spectra",
      cell: ({ getValue }) => <span className="num">{getValue<number>()}</span>,
      enableGlobalFilter: false,
    },
    {
      accessorKey: "latestGapEv",
      header: "Latest gap",
      sortUndefined: "last",
      cell: ({ row }) => (
        <span className="num">{formatGap(row.original.latestGapEv, row.original.latestGapClosed)}</span>
      ),
      enableGlobalFilter: false,
    },
    {
      id: "crossing",
      accessorFn: (r) => r.crossingState ?? "",
      header: "Crossing",
      cell: ({ row }) => (
        <span className="inline-flex items-center gap-2">
          <CrossingBadge state={row.original.crossingState} status={row.original.crossingStatus} />
          {row.original.crossingFieldVPerNm != null && row.original.crossingState === "crossed" ? (
            <span className="num text-xs text-ink-soft">{row.original.crossingFieldVPerNm.toFixed(2)} V/nm</span>
          ) : null}
        </span>
      ),
    },
  ];
  return (
    <DataTable
      data={samples}
      columns={columns}
      filterPlaceholder="Filter samples by name or material"
      testId="samples-table"
      initialSort={[{ id: "name", desc: false }]}
    />
  );
}
