/** Mounts a plot's SVG text (plots are pure functions from data to SVG; this only shows them). */
export function SvgPlot({ svg, testId }: { svg: string; testId?: string }) {
  return <div className="svg-plot" data-testid={testId} dangerouslySetInnerHTML={{ __html: svg }} />;
}
