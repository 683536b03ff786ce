/**
 * Rows a windowed table does not draw (src/lib/use-row-window.ts): one empty row as tall as they are, so the table
 * scrolls as if they were there; hidden from assistive technology (the drawn rows' aria-rowindex counts the others).
 */
export function RowGap({ height, cols }: { height: number; cols: number }) {
  return (
    <tr aria-hidden="true" data-gap>
      <td colSpan={cols} style={{ height, padding: 0, border: 0 }} />
    </tr>
  );
}
