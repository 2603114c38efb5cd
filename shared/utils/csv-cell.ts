// Writing CSV that is safe to open in a spreadsheet, for the server's exports and the browser's chart downloads.
// Every text field is quoted (RFC 4180 §2: a field in double quotes may hold commas, quotes doubled, and line
// breaks), so user text such as a run name can never split into extra fields. Text that a spreadsheet would run
// as a formula (starting with = + - @, tab or carriage return: OWASP "CSV Injection") gets a leading ' , which
// spreadsheets show as text. Numbers are written bare; a non-finite number is an empty field.

const FORMULA_START = /^[=+\-@\t\r]/

/** A text's content as written (before quoting): line breaks folded to spaces, formula starts neutralised. */
export function safeCsvText(text: string): string {
  const oneLine = text.replace(/[\r\n]+/g, ' ')
  return FORMULA_START.test(oneLine) ? `'${oneLine}` : oneLine
}

/** One text field: safeCsvText, always quoted. */
export function csvText(text: string): string {
  return `"${safeCsvText(text).replace(/"/g, '""')}"`
}

export type CsvValue = string | number | null | undefined

/** One field of any kind: numbers bare, text through csvText, null/undefined/NaN/±∞ empty. */
export function csvField(v: CsvValue): string {
  if (v === null || v === undefined) return ''
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : ''
  return csvText(v)
}

export function csvRow(fields: CsvValue[]): string {
  return fields.map(csvField).join(',')
}

/**
 * A metadata line: a row whose first field starts with `#`, so readers told to skip comment lines (pandas
 * `comment='#'`, R `comment.char`) skip it, and a reader that does not still gets whole, neutralised fields.
 */
export function csvCommentRow(label: string, fields: CsvValue[]): string {
  return [`# ${label.replace(/[",\r\n]/g, ' ')}`, ...fields.map(csvField)].join(',')
}
