import { describe, expect, it } from 'vitest'
import { utf8ByteLength } from '../../shared/text'

// The reference is Node's own UTF-8 encoder (Buffer.byteLength), independent of the code under test.
describe('utf8ByteLength', () => {
  it.each(['', 'plain ascii', 'p₀ = 6.2 bar', 'ṁ·vₑ', 'Mach 2 ✓', '𝛾 = 1.4 🚀', 'lone \ud800 surrogate'])(
    'matches Node for %j',
    (s) => {
      expect(utf8ByteLength(s)).toBe(Buffer.byteLength(s, 'utf8'))
    },
  )
})
