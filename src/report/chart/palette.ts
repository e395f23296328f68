/**
 * Colours of named series: the names sorted (as text), each given the next
 * colour of the ten-colour categorical scheme "tableau10", whose values come
 * from the vega-scale package (the figures' colours have always been these).
 */
import { scheme } from "vega-scale";

/** Each name's colour, the names taken in sorted order. */
export function categoryColours(names: Iterable<string>): Map<string, string> {
  const colours = scheme("tableau10") as readonly string[];
  const sorted = [...new Set(names)].sort();
  return new Map(sorted.map((n, i) => [n, colours[i % colours.length]!]));
}
