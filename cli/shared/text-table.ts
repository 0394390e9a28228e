/**
 * A plain text table: columns padded to their widest cell, two spaces apart, a dashed rule under
 * the header, no trailing spaces.
 * @param header column titles
 * @param rows cells as text, one array per row (as many cells as the header)
 * @returns the lines, without newlines
 */
export function textTable(header: string[], rows: string[][]): string[] {
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (r: string[]): string => r.map((c, i) => c.padEnd(widths[i])).join('  ').trimEnd();
  return [line(header), line(widths.map((w) => '-'.repeat(w))), ...rows.map(line)];
}
