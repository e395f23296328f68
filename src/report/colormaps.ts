/**
 * Colour maps for density pictures: only perceptually uniform ones (equal
 * steps in value look like equal steps in colour, and lightness rises
 * monotonically, so a picture reads the same in grey): viridis, magma,
 * inferno and plasma (van der Walt & Smith, designed for matplotlib 2.0)
 * and cividis (Nuñez, Anderton & Renslow 2018, also readable with
 * red–green colour blindness). The tables come from Vega's schemes
 * (vega-scale alone: the main thread does not load the rest of Vega).
 */
import { scheme } from "vega-scale";
import { InputError } from "../core/errors.js";

export const COLOUR_MAPS = ["viridis", "magma", "inferno", "plasma", "cividis"] as const;
export type ColourMap = (typeof COLOUR_MAPS)[number];

/** Check a colour-map name from the command line. */
export function colourMap(name: string, option = "--colormap"): ColourMap {
  if ((COLOUR_MAPS as readonly string[]).includes(name)) return name as ColourMap;
  throw new InputError(`${option}: unknown colour map "${name}"; choose a perceptually uniform one: ${COLOUR_MAPS.join(", ")}`);
}

function parseColour(c: string): [number, number, number] {
  const hex = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(c);
  if (hex) return [parseInt(hex[1]!, 16), parseInt(hex[2]!, 16), parseInt(hex[3]!, 16)];
  const rgb = /^rgb\((\d+),\s*(\d+),\s*(\d+)\)$/.exec(c);
  if (rgb) return [Number(rgb[1]), Number(rgb[2]), Number(rgb[3])];
  throw new Error(`unexpected colour ${c}`);
}

const tables = new Map<ColourMap, Uint8Array>();

/** The colour map as 256 RGB triples (index 0: the lowest value). */
export function colourTable(name: ColourMap): Uint8Array {
  const cached = tables.get(name);
  if (cached) return cached;
  const interp = scheme(name) as (t: number) => string;
  const lut = new Uint8Array(256 * 3);
  for (let i = 0; i < 256; i++) lut.set(parseColour(interp(i / 255)), 3 * i);
  tables.set(name, lut);
  return lut;
}
