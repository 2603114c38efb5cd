// Upload table rules (shared/utils/csv-table.ts) and the mail reader (server/utils/mime.ts, mailparser), pure.
import { describe, expect, it } from 'vitest'
import fc from 'fast-check'
import { fileNameProblem, isFormulaCell, parseDataTable, sniffBinary } from '../../shared/utils/csv-table'
import { parseMail } from '../../server/utils/mime'

const enc = (s: string) => new TextEncoder().encode(s)

describe('formula cells (OWASP CSV injection: = + - @ tab CR at the start)', () => {
  it('plain signed decimals are numbers, not formulas', () => {
    for (const c of ['-0.5', '+1', '-1e-3', '+2.5E+4', '-.5', '0']) expect(isFormulaCell(c)).toBe(false)
  })
  it('anything else starting with = + - @ is a formula', () => {
    for (const c of ['=1+1', '-1+2', '+A1', '@SUM(A1)', '-', '=HYPERLINK("x")', '\t=1', '-2,3']) expect(isFormulaCell(c)).toBe(true)
  })
  it('every finite double printed by JavaScript is a number cell (property)', () => {
    fc.assert(fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => !isFormulaCell(String(x))), { seed: 99, numRuns: 500 })
  })
})

describe('parseDataTable', () => {
  it('reads a profile with comments, a BOM, semicolons and unit suffixes in the header', () => {
    const r = parseDataTable('lens_profile', enc('\uFEFF# stylus 2 µm\nr (µm);height (µm)\n0;3\n2.5;2\n5;0\n'))
    expect(r).toEqual({ ok: true, columns: ['r_um', 'height_um'], rows: [[0, 3], [2.5, 2], [5, 0]] })
  })
  it('reads quoted cells (RFC 4180 §2) and keeps file line numbers past comments and a quoted line break', () => {
    const ok = parseDataTable('lens_profile', enc('r_um;height_um\n# note; "unclosed\n\n0;" 1.0 "\n"1";0.5\n'))
    expect(ok).toEqual({ ok: true, columns: ['r_um', 'height_um'], rows: [[0, 1], [1, 0.5]] })
    const bad = parseDataTable('lens_profile', enc('r_um,height_um\n0,1\n"x\ny",0.5\n2,abc\n'))
    expect(bad.ok).toBe(false)
    if (!bad.ok) expect(bad.errors.map((e) => [e.line, e.column])).toEqual([[3, 'r_um'], [5, 'height_um']])
  })
  it('names every bad line, not only the first', () => {
    const r = parseDataTable('angular_profile', enc('theta_deg,intensity\n0,1\n10,x\n20,-1\n30\n'))
    expect(r.ok).toBe(false)
    if (!r.ok) expect(r.errors.map((e) => e.line)).toEqual([3, 4, 5])
  })
  it('refuses a profile that does not start at the centre or rises towards the rim', () => {
    const a = parseDataTable('lens_profile', enc('r_um,height_um\n1,3\n2,2\n5,0\n'))
    const b = parseDataTable('lens_profile', enc('r_um,height_um\n0,3\n2,3.5\n5,0\n'))
    expect(a.ok || a.errors[0]!.message).toMatch(/start at the lens centre/)
    expect(b.ok || b.errors[0]!.message).toMatch(/line 3, height_um: height must not rise/)
  })
  it('sniffs content, not names', () => {
    expect(sniffBinary(new Uint8Array([0x25, 0x50, 0x44, 0x46, 0x2d]))).toMatch(/PDF/)
    expect(sniffBinary(new Uint8Array([0xc3, 0x28]))).toMatch(/not UTF-8/)
    expect(sniffBinary(enc('r_um,height_um\n0,1\n'))).toBeNull()
  })
  it('refuses path-like file names and accepts plain ones', () => {
    for (const n of ['../x.csv', 'a/b.csv', 'a\\b.csv', '.hidden.csv', 'C:x.csv', 'x\u0000.csv']) expect(fileNameProblem(n)).not.toBeNull()
    for (const n of ['profile.csv', 'lens trace 07 (final).csv', 'données.txt']) expect(fileNameProblem(n)).toBeNull()
  })
})

describe('mail reader', () => {
  it('decodes quoted-printable bodies and RFC 2047 words (RFC 2045 §6.7, RFC 2047 §4)', async () => {
    const qp = await parseMail(['Subject: =?UTF-8?Q?Sweep_finished:_=C2=B5m?=', 'Content-Type: text/plain; charset=utf-8',
      'Content-Transfer-Encoding: quoted-printable', '', 'caf=C3=A9 =', 'au lait', ''].join('\r\n'))
    expect(qp.subject).toBe('Sweep finished: µm')
    expect(qp.text).toBe('café au lait')
    expect((await parseMail('Subject: =?UTF-8?B?wrE=?=\r\n\r\nx\r\n')).subject).toBe('±')
  })
  it('takes the text and HTML parts of a multipart/alternative message', async () => {
    const raw = ['Subject: =?UTF-8?Q?Hi_=C2=B1?=', 'Content-Type: multipart/alternative; boundary="b1"', '', '--b1', 'Content-Type: text/plain; charset=utf-8',
      'Content-Transfer-Encoding: quoted-printable', '', 'one =C2=B1 two', '--b1', 'Content-Type: text/html', '', '<p>x</p>', '--b1--', ''].join('\r\n')
    const m = await parseMail(raw)
    expect(m.subject).toBe('Hi ±')
    expect(m.text).toBe('one ± two')
    expect(m.html).toBe('<p>x</p>')
  })
})
