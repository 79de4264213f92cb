import { fileLayout, legendHeight, legendProbe, probeLayout } from "./figure-file";
import { FILE_FONTS } from "./look";
import { loadPlotly } from "./plotly-script";

type PlotlyLib = Awaited<ReturnType<typeof loadPlotly>>;

/** The file name a plot's config gives its figure files. */
export const fileName = (config: unknown) =>
  (config as { toImageButtonOptions?: { filename?: string } } | undefined)?.toImageButtonOptions?.filename ??
  "bandcross-figure";

/**
 * Writes a drawn figure to a PNG (at 2×) or SVG file. Drawn afresh from its data and layout with
 * WebGL at ratio 2, whatever ratio the screen's copy uses, so WebGL points are as sharp as the rest.
 * The file is `width` wide and at least `height` tall, its legend whole at its foot (`figure-file.ts`).
 */
export async function downloadFigure(
  gd: HTMLElement,
  { format, filename, width, height }: { format: "png" | "svg"; filename: string; width: number; height: number },
) {
  const Plotly = await loadPlotly();
  const { data, layout: onScreen } = gd as unknown as { data: Plotly.Data[]; layout: Partial<Plotly.Layout> };
  // Text in the file's face by name only: a file has no web fonts, and text measured in the page's
  // web font (the legend's width, its clip) ran past its box in the wider face the file fell back to.
  const shown = { ...onScreen, font: { ...onScreen.font, family: FILE_FONTS } };
  const file = fileLayout(shown, {
    width,
    height,
    legendHeight: await measureLegend(Plotly, data, shown, width, height),
  });
  // downloadImage hands its options to toImage, which takes `scale`; the published types omit it.
  const options = { format, filename, width, height: file.height, scale: format === "png" ? 2 : 1 };
  await Plotly.downloadImage(
    {
      data,
      layout: { ...file.layout, width, height: file.height },
      config: { plotGlPixelRatio: 2 },
    } as unknown as HTMLElement,
    options,
  );
}

/** The figure's legend height at the file's width, from a probe drawing out of sight (one point a trace). */
async function measureLegend(
  Plotly: PlotlyLib,
  data: Plotly.Data[],
  layout: Partial<Plotly.Layout>,
  width: number,
  height: number,
): Promise<number> {
  if (layout.showlegend === false) return 0;
  const probe = document.createElement("div");
  probe.style.cssText = `position:fixed;left:-100000px;top:0;width:${width}px;height:${height}px;visibility:hidden`;
  document.body.appendChild(probe);
  try {
    await Plotly.newPlot(
      probe,
      legendProbe(data) as Plotly.Data[],
      { ...probeLayout(layout, width), width, height },
      { staticPlot: true },
    );
    return legendHeight(probe);
  } finally {
    Plotly.purge(probe);
    probe.remove();
  }
}
