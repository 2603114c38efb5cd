import { describe, expect, it } from 'vitest'
import { isOriginAllowed, isStateChangingMethod } from '../../server/utils/origin'

describe('isOriginAllowed', () => {
  it('lets safe methods through whatever the Origin', () => {
    for (const m of ['GET', 'HEAD', 'OPTIONS']) {
      expect(isOriginAllowed(m, undefined, 'lensfield.test')).toBe(true)
      expect(isOriginAllowed(m, 'https://elsewhere.example', 'lensfield.test')).toBe(true)
    }
  })

  it('needs a same-host Origin on every state-changing method', () => {
    for (const m of ['POST', 'PUT', 'PATCH', 'DELETE', 'post']) {
      expect(isStateChangingMethod(m)).toBe(true)
      expect(isOriginAllowed(m, 'http://127.0.0.1:3000', '127.0.0.1:3000')).toBe(true)
      expect(isOriginAllowed(m, 'https://Lensfield.test', 'lensfield.test')).toBe(true)
      expect(isOriginAllowed(m, undefined, '127.0.0.1:3000')).toBe(false)
      expect(isOriginAllowed(m, '', '127.0.0.1:3000')).toBe(false)
      expect(isOriginAllowed(m, 'null', '127.0.0.1:3000')).toBe(false)
      expect(isOriginAllowed(m, 'http://127.0.0.1:3001', '127.0.0.1:3000')).toBe(false)
      expect(isOriginAllowed(m, 'http://127.0.0.1:3000.evil.example', '127.0.0.1:3000')).toBe(false)
      expect(isOriginAllowed(m, 'http://evil.example', '127.0.0.1:3000')).toBe(false)
      expect(isOriginAllowed(m, 'file:///etc', '127.0.0.1:3000')).toBe(false)
      expect(isOriginAllowed(m, 'http://127.0.0.1:3000', undefined)).toBe(false)
    }
  })
})

describe('isOriginAllowed compares the scheme when the request has one', () => {
  // RFC 6454 §4: an origin is (scheme, host, port); https://h and http://h are different origins.
  it('refuses an https origin for an http request to the same host', () => {
    expect(isOriginAllowed('POST', 'https://127.0.0.1:3000', '127.0.0.1:3000', 'http')).toBe(false)
    expect(isOriginAllowed('POST', 'http://127.0.0.1:3000', '127.0.0.1:3000', 'https')).toBe(false)
  })
  it('accepts the matching scheme', () => {
    expect(isOriginAllowed('POST', 'http://127.0.0.1:3000', '127.0.0.1:3000', 'http')).toBe(true)
    expect(isOriginAllowed('PATCH', 'https://lensfield.test', 'lensfield.test', 'https')).toBe(true)
  })
})
