// Output: files, colour maps, SVG pictures and charts, raster images.

export { writeFileAtomic, ensureDir, RowWriter, formatNumber, csvCell } from './files.js';
export { colorAt, sequential, diverging, damageMap, hexToOklab, luminance, type ColorMap } from './colormap.js';
export { el, esc, layer, text, n, polyPath, svgDocument, type Attrs } from './svg.js';
export { niceTicks, niceStep, niceAxis, niceDomain, formatTicks, formatValue } from './ticks.js';
export { fieldSvg, meshSvg, autoMagnification, type FieldPicture } from './field.js';
export { plotSvg, PALETTE, type Series, type PlotOptions } from './plot.js';
export { svgToPng, framesToAnimation, pickFrames, svgWidth } from './png.js';
export { plotPanelsSvg } from './plot.js';
export { curveInsetSvg, type CurveInset } from './inset.js';
export { writeReport, reportHtml, CAUTION } from './report.js';
export { vtuText, pvdText, VtkSeries } from './vtk.js';
export { RunFiles, curveSvg, summaryOf, CURVE_HEADER, PROBE_HEADER } from './runfiles.js';
export { curvePeaks, runWarnings, workOfFractureEstimate, bulkOverstress } from './warnings.js';
