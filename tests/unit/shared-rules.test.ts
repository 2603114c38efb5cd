// The rules app pages and the server share (shared/utils): who edits, which run states are open, how σ is shown.
import { describe, expect, it } from 'vitest'
import { EDITOR_ROLES, roleCanEdit } from '../../shared/utils/roles'
import { OPEN_STATUSES, RUN_STATUSES, isOpenStatus } from '../../shared/utils/run-status'
import { pctErr, sigmaDecimals, withErr } from '../../shared/utils/format'
import { ROLE_NAMES } from '../../shared/types/account'

describe('shared rules', () => {
  it('a lead or designer edits; a viewer, no role or an unknown role does not', () => {
    expect(ROLE_NAMES.filter(roleCanEdit)).toEqual(['lead', 'designer'])
    expect(EDITOR_ROLES).toEqual(['lead', 'designer'])
    expect(roleCanEdit(null)).toBe(false)
    expect(roleCanEdit(undefined)).toBe(false)
    expect(roleCanEdit('owner')).toBe(false)
  })

  it('queued and running are the open states; done, cancelled and failed are final', () => {
    expect(RUN_STATUSES.filter(isOpenStatus)).toEqual([...OPEN_STATUSES])
    expect(['done', 'cancelled', 'failed', 'infeasible', null].some(isOpenStatus)).toBe(false)
  })

  it('σ to two significant digits, the value to the same place, the unit after (one rule for pages and mails)', () => {
    expect(sigmaDecimals(0.0301)).toBe(3)
    expect(sigmaDecimals(0.4)).toBe(2)
    expect(sigmaDecimals(12)).toBe(0)
    expect(sigmaDecimals(0)).toBe(4)
    expect(sigmaDecimals(Number.NaN)).toBe(4)
    expect(sigmaDecimals(1e-12)).toBe(8)
    expect(withErr(1.98765, 0.0301, '×')).toBe('1.988 ± 0.030 ×')
    expect(withErr(0.41234, 0.00011)).toBe('0.41234 ± 0.00011')
    expect(withErr(Number.POSITIVE_INFINITY, 0.1, 'µm')).toBe('—')
    expect(pctErr(0.342049, 0.00274)).toBe('34.20 ± 0.27 %')
  })
})
