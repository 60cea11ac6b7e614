import { describe, expect, it } from 'vitest'
import { Email } from './auth'

describe('Email', () => {
  it('takes internationalised addresses (RFC 6531) in one normalised, lower-cased form', () => {
    expect(Email.parse(' Jörg@Example.org ')).toBe('jörg@example.org')
    expect(Email.parse('anna@müller.de')).toBe('anna@müller.de')
    expect(Email.parse('anna@xn--mller-kva.de')).toBe('anna@xn--mller-kva.de')
    expect(Email.parse('ünal@例え.jp')).toBe('ünal@例え.jp')
    // "ö" typed as o + combining diaeresis is the same address as the single character.
    expect(Email.parse('jo\u0308rg@example.org')).toBe('jörg@example.org')
    expect(Email.parse("o'brien+lab@uni-x.ac.uk")).toBe("o'brien+lab@uni-x.ac.uk")
  })

  it('still refuses what is not an address', () => {
    for (const bad of [
      'x@y',
      'a@b.c',
      'bad@@x.org',
      'a b@c.de',
      '.a@b.de',
      'a..b@c.de',
      'a@-x.de',
      '<a@b.de>',
      '',
    ])
      expect(Email.safeParse(bad).success, bad).toBe(false)
  })
})
