/**
 * Ebullio's chart palette: distinguishable hues in a fixed order, so a concentration or an
 * operation keeps its colour between the table and the chart. Chosen for contrast on both the
 * light and the dark theme; the order alternates warm and cool so neighbours differ.
 */
export const chartPalette = [
  '#0b7285', // deep teal
  '#e8590c', // ember
  '#5f3dc4', // indigo
  '#2b8a3e', // fern
  '#c2255c', // raspberry
  '#1971c2', // river blue
  '#e67700', // amber
  '#495057', // slate
  '#0ca678', // mint
  '#862e9c', // plum
] as const;

export function paletteColour(i: number): string {
  return chartPalette[((i % chartPalette.length) + chartPalette.length) % chartPalette.length]!;
}
