/**
 * The one look of every figure: the font, the PNG zoom and the Vega and
 * Vega-Lite style (sizes, formatted ticks). Plain constants, loaded by the
 * modules that build specifications without loading Vega itself.
 */
export const FONT = "DejaVu Sans";
/** PNG pixels per SVG unit. */
export const PNG_SCALE = 3;

/** The shared look: fonts, sizes, formatted ticks. Used as Vega-Lite `config` and merged into Vega specs. */
export const STYLE = {
  font: FONT,
  title: { font: FONT, subtitleFont: FONT, fontSize: 11, fontWeight: "bold", subtitleFontSize: 10, anchor: "start", offset: 6 },
  axis: {
    labelFont: FONT,
    titleFont: FONT,
    labelFontSize: 10,
    titleFontSize: 11,
    titleFontWeight: "normal",
    labelExpr: "psiboxTick(datum.value)",
    labelOverlap: true,
    labelFlush: false,
    tickCount: 5,
    grid: false,
    domainColor: "#333",
    tickColor: "#333",
  },
  legend: { labelFont: FONT, titleFont: FONT, labelFontSize: 10, titleFontSize: 10, titleFontWeight: "normal", labelLimit: 300, titleLimit: 400 },
  text: { font: FONT },
  // lines turn round at their points: a sharp turn of a mitred line draws a spike past the point
  line: { strokeJoin: "round" },
  view: { stroke: "#333" },
} as const;
