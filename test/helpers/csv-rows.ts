/** Split RFC 4180 CSV (quoted fields, CRLF) into rows of cells, independently of the writer. */
export function rowsOf(csv: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cur = '';
  let quoted = false;
  for (let i = 0; i < csv.length; i++) {
    const ch = csv[i] as string;
    if (quoted) {
      if (ch === '"' && csv[i + 1] === '"') {
        cur += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cur += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      row.push(cur);
      cur = '';
    } else if (ch === '\r' && csv[i + 1] === '\n') {
      row.push(cur);
      rows.push(row);
      row = [];
      cur = '';
      i++;
    } else cur += ch;
  }
  return rows;
}
