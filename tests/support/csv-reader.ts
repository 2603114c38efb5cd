// Parses CSV text with a real, independent CSV reader: Python's standard-library csv module (RFC 4180 dialect
// "excel"), so tests do not check our writer with our own parser. python3 ships with Debian.
import { execFileSync } from 'node:child_process'

export function readCsv(text: string): string[][] {
  const out = execFileSync('python3', ['-c', 'import csv,json,sys; print(json.dumps(list(csv.reader(sys.stdin))))'], {
    input: text, encoding: 'utf8',
  })
  return JSON.parse(out) as string[][]
}

/** The spreadsheet formula starts (OWASP "CSV Injection"). */
export const FORMULA_START = /^[=+\-@\t\r]/
