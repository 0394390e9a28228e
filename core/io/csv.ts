/**
 * Minimal RFC 4180 CSV for the project's own tables (segments.csv, furcations.csv, stand.csv …):
 * comma-separated, a header row, fields quoted only when they contain a comma, quote or newline.
 */
export function parseCsv(text: string): { header: string[]; rows: string[][] } {
  const records: string[][] = [];
  let field = '';
  let record: string[] = [];
  let inQuotes = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i];
    if (inQuotes) {
      if (ch === '"') {
        if (text[i + 1] === '"') {
          field += '"';
          i++;
        } else inQuotes = false;
      } else field += ch;
    } else if (ch === '"') inQuotes = true;
    else if (ch === ',') {
      record.push(field);
      field = '';
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && text[i + 1] === '\n') i++;
      record.push(field);
      field = '';
      if (!(record.length === 1 && record[0] === '')) records.push(record);
      record = [];
    } else field += ch;
  }
  if (field !== '' || record.length > 0) {
    record.push(field);
    records.push(record);
  }
  const [header = [], ...rows] = records;
  return { header: header.map((h) => h.trim()), rows };
}

export function formatCsv(header: string[], rows: (string | number | boolean)[][]): string {
  const cell = (v: string | number | boolean): string => {
    const s = typeof v === 'number' ? formatNumber(v) : String(v);
    return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
  };
  return [header.map(cell).join(','), ...rows.map((r) => r.map(cell).join(','))].join('\n') + '\n';
}

/** Shortest round-trip decimal, so a CSV written and read back gives the same doubles. */
export function formatNumber(v: number): string {
  if (Number.isNaN(v)) return 'NaN';
  if (!Number.isFinite(v)) return v > 0 ? 'Inf' : '-Inf';
  return String(v);
}
