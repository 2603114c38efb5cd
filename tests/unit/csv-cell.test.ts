import { describe, expect, it } from 'vitest'
import { csvCommentRow, csvRow, csvText } from '../../shared/utils/csv-cell'
import { toCsv } from '../../app/utils/exportData'
import { FORMULA_START, readCsv } from '../support/csv-reader'

// Hostile names: commas to split a field, quotes to close one, formula starts (OWASP "CSV Injection"), line breaks.
const HOSTILE = [
  'Run A,=HYPERLINK("http://x.example","click")',
  '=1+2', '+SUM(A1:A9)', '-2+3', '@SUM(A1)', '\t=1', 'a"b,"c', 'two\nlines, =3', ',,,', '"', 'plain name',
]

describe('CSV writing (shared/utils/csv-cell.ts), read back by Python\'s csv module', () => {
  it('keeps each hostile text in one field and neutralises formula starts', () => {
    const text = HOSTILE.map((h) => csvRow(['x', h, 1.5])).join('\r\n') + '\r\n'
    const rows = readCsv(text)
    expect(rows).toHaveLength(HOSTILE.length)
    rows.forEach((r, i) => {
      expect(r).toHaveLength(3)
      expect(r[1]!).not.toMatch(FORMULA_START)
      expect(r[1]!.replace(/^'/, '')).toBe(HOSTILE[i]!.replace(/[\r\n]+/g, ' '))
      expect(r[2]).toBe('1.5')
    })
  })

  it('a metadata row starts with # and holds user text as whole fields', () => {
    const rows = readCsv(csvCommentRow('Lensfield result', ['run', HOSTILE[0], 'design', HOSTILE[1], 'cell', 3]) + '\n')
    expect(rows).toEqual([['# Lensfield result', 'run', HOSTILE[0], 'design', `'${HOSTILE[1]}`, 'cell', '3']])
  })

  it('the browser\'s chart download neutralises formula cells too', () => {
    const rows = readCsv(toCsv(['label', 'value'], HOSTILE.map((h, i) => [h, i])))
    expect(rows.slice(1).map((r) => r[0]!.match(FORMULA_START))).toEqual(HOSTILE.map(() => null))
    expect(rows.slice(1).every((r) => r.length === 2)).toBe(true)
  })

  it('quotes plain text too, and doubles quotes (RFC 4180 §2.7)', () => {
    expect(csvText('plain')).toBe('"plain"')
    expect(csvText('say "hi"')).toBe('"say ""hi"""')
    expect(csvText('=1')).toBe(`"'=1"`)
  })
})
