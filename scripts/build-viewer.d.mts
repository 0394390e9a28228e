/** Bundle the report viewer to `outfile` (default dist/report-viewer.js); resolves to the output path. */
export function buildViewer(outfile?: string): Promise<string>;
