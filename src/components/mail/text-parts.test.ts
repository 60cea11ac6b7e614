import { describe, expect, it } from 'vitest'
import { textParts } from './text-parts'

describe('textParts', () => {
  it('turns http and https addresses into links, keeping the text around them', () => {
    expect(textParts('Open http://127.0.0.1:3000/join#Ab_-9 now.\nBye')).toEqual([
      { kind: 'text', text: 'Open ' },
      { kind: 'link', text: 'http://127.0.0.1:3000/join#Ab_-9', href: 'http://127.0.0.1:3000/join#Ab_-9' },
      { kind: 'text', text: ' now.\nBye' },
    ])
  })

  it('leaves closing punctuation outside the link and ignores other schemes', () => {
    expect(textParts('(see https://nestwise.example.org/x).')).toEqual([
      { kind: 'text', text: '(see ' },
      { kind: 'link', text: 'https://nestwise.example.org/x', href: 'https://nestwise.example.org/x' },
      { kind: 'text', text: ').' },
    ])
    expect(textParts('javascript:alert(1) mailto:a@b.c')).toEqual([
      { kind: 'text', text: 'javascript:alert(1) mailto:a@b.c' },
    ])
  })

  it('returns nothing for empty text', () => {
    expect(textParts('')).toEqual([])
  })
})
