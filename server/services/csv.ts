import Papa from 'papaparse'

/**
 * Spreadsheet-safe CSV. A spreadsheet reads a cell that begins with = + - @ (or a tab or carriage
 * return, which some strip before looking) as a formula, so `=HYPERLINK(…)` in a traveller's name
 * would run when an organiser opens the export. Such text cells get a leading apostrophe, which the
 * spreadsheet shows as plain text (OWASP "CSV injection"). A cell that spans lines is checked at the
 * start of every line too: some importers split a quoted multi-line cell and evaluate each line.
 * Numbers stay numbers (a negative longitude is not a formula).
 */
const FORMULA_START = new Set(['=', '+', '-', '@', '\t', '\r'])

export function csvSafeCell<T>(value: T): T | string {
  if (typeof value !== 'string') return value
  // Character by character, so a line that starts right after a carriage return which itself opened
  // a line ("\r=1") is checked too.
  let out = ''
  for (let i = 0; i < value.length; i++) {
    const lineStart = i === 0 || value[i - 1] === '\r' || value[i - 1] === '\n'
    if (lineStart && FORMULA_START.has(value[i]!)) out += "'"
    out += value[i]
  }
  return out
}

/** CSV with a header row from the first object's keys; every text cell made safe as above. */
export function toSafeCsv(rows: Array<Record<string, unknown>>): string {
  return Papa.unparse(rows.map((r) => Object.fromEntries(Object.entries(r).map(([k, v]) => [k, csvSafeCell(v)]))), { escapeFormulae: false })
}
