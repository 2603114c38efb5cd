import { describe, expect, it } from 'vitest'
import { dateTime, isoTime } from '../../app/utils/format'

// Expected strings follow the CLDR locale data shipped with Node's ICU (common practice: Intl.DateTimeFormat).
describe('one date format: the reader\'s locale, ISO in the tooltip', () => {
  const at = '2026-12-02T13:05:00.000Z'
  it('ISO 8601 UTC for the tooltip, whatever the input form', () => {
    expect(isoTime(at)).toBe(at)
    expect(isoTime(new Date(Date.UTC(2026, 11, 2, 13, 5)))).toBe(at)
    expect(isoTime('not a date')).toBe('')
    expect(isoTime(null)).toBe('')
  })
  it('follows the locale it is given (day-month order in en-GB, month-day in en-US)', () => {
    const gb = dateTime(at, 'en-GB', false)
    const us = dateTime(at, 'en-US', false)
    expect(gb).toBe('2 Dec 2026')
    expect(us).toBe('Dec 2, 2026')
  })
  it('a missing or broken time is a dash, not "Invalid Date"', () => {
    expect(dateTime(null)).toBe('—')
    expect(dateTime('garbage')).toBe('—')
  })
})
