import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { zodValidator } from '../../server/utils/validation'
import { designCreateSchema } from '../../shared/types/design'
import { signUpSchema } from '../../shared/types/account'

function errorOf(fn: () => unknown) {
  try {
    fn()
  } catch (err) {
    return err as { statusCode: number, message: string }
  }
  throw new Error('expected a validation error')
}

describe('zodValidator', () => {
  it('returns parsed data (trimmed, lower-cased e-mail)', () => {
    expect(zodValidator(signUpSchema)({ email: ' Ada@Example.COM ', name: ' Ada ', password: '0123456789' }))
      .toEqual({ email: 'ada@example.com', name: 'Ada', password: '0123456789' })
  })

  it('throws a 400 that names each bad field', () => {
    const err = errorOf(() => zodValidator(signUpSchema)({ email: 'x', name: '', password: 'short' }))
    expect(err.statusCode).toBe(400)
    expect(err.message).toContain('email must be a valid e-mail address')
    expect(err.message).toContain('name must not be empty')
    expect(err.message).toContain('password must be at least 10 characters')
  })

  it('prefixes the path when the message does not name it', () => {
    const err = errorOf(() => zodValidator(z.object({ pitch: z.number() }))({ pitch: 'a' }))
    expect(err.message).toMatch(/^pitch: /)
  })

  it('words scenario issues as the design editor does (field name, rounded limit, unit)', () => {
    const err = errorOf(() => zodValidator(designCreateSchema)({
      name: 'x',
      scenario: {
        emitter: { index: 1.7 },
        reflector: { reflectance: 0.8 },
        substrate: { index: 1.5, thicknessUm: 100 },
        lensArray: { lattice: 'hexagonal', pitchUm: 10, diameterUm: 10, sagUm: 6 },
      },
    }))
    expect(err.message).toBe('Sag h must be at most D/2 = 5 µm for a spherical cap: got 6 µm')
  })
})
