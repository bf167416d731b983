/**
 * A plain aligned table for terminals: a title line, column heads, a rule of
 * thin dashes, rows; numbers right-aligned, text left-aligned. No colours, so
 * it reads the same in logs and pipes.
 */
export function renderTable(title: string, heads: readonly string[], rows: ReadonlyArray<ReadonlyArray<string | number>>): string {
  const cells = rows.map((row) => row.map((cell) => String(cell)));
  const widths = heads.map((head, c) => Math.max(head.length, ...cells.map((row) => (row[c] ?? '').length)));
  const numeric = heads.map((_, c) => rows.every((row) => typeof row[c] === 'number' || /^[-+]?[\d.,]+(e[-+]?\d+)?%?$/i.test(String(row[c] ?? ''))));
  const format = (row: readonly string[]): string =>
    row.map((cell, c) => (numeric[c] ? cell.padStart(widths[c]!) : cell.padEnd(widths[c]!))).join('  ').trimEnd();
  const lines = [title, format([...heads]), widths.map((w) => '-'.repeat(w)).join('  ')];
  for (const row of cells) lines.push(format(row));
  return `${lines.join('\n')}\n`;
}
