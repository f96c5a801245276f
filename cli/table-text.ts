// Plain-text tables for people at a terminal.
export function textTable(header: string[], rows: (string | number)[][], align: ('l' | 'r')[] = []): string {
  const cells = [header, ...rows.map((r) => r.map(String))];
  const widths = header.map((_, j) => Math.max(...cells.map((r) => (r[j] ?? '').length)));
  const line = (r: string[]) =>
    r.map((c, j) => ((align[j] ?? (j === 0 ? 'l' : 'r')) === 'l' ? c.padEnd(widths[j]) : c.padStart(widths[j]))).join('  ').trimEnd();
  return [line(cells[0]), widths.map((w) => '-'.repeat(w)).join('  '), ...cells.slice(1).map(line)].join('\n') + '\n';
}

export function deg(x: number, digits = 4): string {
  return (x * 180 / Math.PI).toFixed(digits);
}
