import { useState } from 'react';
import type { LineLayout } from '../../lib/plot/line-plot';
import { paintedSvg } from '../../lib/plot/svg/painted-svg';
import { figureFonts } from './figure-fonts';
import { downloadSvg } from './download-figure';
import { fileSafe } from './download';

interface Props {
  /** Null until the plot has measured its width (the button waits). */
  layout: LineLayout | null;
  /** The plot's own canvas painter, run again on an SVG context. */
  draw: (ctx: CanvasRenderingContext2D, layout: LineLayout) => void;
  label: string;
  fileName: string;
  testId?: string;
}

/** A small "Export SVG" button (right-aligned row): the plot as painted, as a vector figure with fonts embedded. */
export default function SvgExportButton({ layout, draw, label, fileName, testId }: Props) {
  const [problem, setProblem] = useState<string | null>(null);
  const run = async () => {
    if (layout === null) return;
    try {
      setProblem(null);
      // The painters use only the context calls SvgContext records (figure.ts Ctx plus clip).
      const svg = await paintedSvg(layout.width, layout.height, (ctx) => draw(ctx as unknown as CanvasRenderingContext2D, layout), { fonts: await figureFonts(), title: label });
      downloadSvg(svg, `${fileSafe(fileName)}.svg`);
    } catch (error) {
      setProblem(`The SVG could not be made: ${error instanceof Error ? error.message : String(error)}`);
    }
  };
  return (
    <div className="flex items-center justify-end gap-2">
      {problem !== null && (
        <span role="alert" className="text-xs text-coral-deep">
          {problem}
        </span>
      )}
      <button type="button" className="rounded-sm border border-kelp bg-foam px-2 py-0 text-xs leading-4 text-kelp-deep hover:bg-kelp-pale" onClick={() => void run()} disabled={layout === null} aria-label={`Export SVG: ${label}`} data-testid={testId}>
        Export SVG
      </button>
    </div>
  );
}
