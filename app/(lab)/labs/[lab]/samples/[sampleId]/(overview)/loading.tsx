import { preinit } from "react-dom";
import { PLOTLY_SRC } from "@/components/plots/plotly-script";
import { Card } from "@/components/ui/card";

/**
 * The sample page while its data loads: the page's frame at once, and the plotting library named
 * in this first part of the response, so the browser fetches and runs it while the server is still
 * reading the phase data (the plot then only has to draw when its data arrives).
 */
export default function LoadingSample() {
  preinit(PLOTLY_SRC, { as: "script", fetchPriority: "high" });
  return (
    <div aria-busy="true" aria-label="Loading the sample">
      <div className="mb-6 space-y-2">
        <div className="h-3 w-16 rounded bg-copper/20" />
        <div className="h-7 w-64 animate-pulse rounded bg-line" />
        <div className="h-4 w-80 animate-pulse rounded bg-line/70" />
      </div>
      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,2.2fr)_minmax(280px,1fr)]">
        <Card title="Gap versus estimated field">
          <div className="mb-3 h-8 w-72 animate-pulse rounded bg-line/70" />
          <div className="h-[440px] animate-pulse rounded-lg bg-line/50" />
        </Card>
        <div className="space-y-5">
          <Card title="Critical field">
            <div className="space-y-3">
              <div className="h-5 w-24 animate-pulse rounded bg-line/70" />
              <div className="h-9 w-40 animate-pulse rounded bg-line" />
              <div className="h-16 animate-pulse rounded bg-line/50" />
            </div>
          </Card>
          <Card title="How the field is estimated">
            <div className="h-28 animate-pulse rounded bg-line/50" />
          </Card>
        </div>
      </div>
    </div>
  );
}
