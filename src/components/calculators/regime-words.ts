import { IDEAL_EXPANSION_BAND } from '@shared/physics'
import type { NozzleRegime } from '@shared/physics'

/** A nozzle's operating regime in words, as the calculators that run nozzleFlow show it. */
export const REGIME_WORDS: Record<NozzleRegime, { title: string; detail: string }> = {
  subsonic: {
    title: 'Subsonic',
    detail:
      'the throat is not choked; the flow speeds up to the throat, slows down after it and leaves at ambient pressure.',
  },
  'shock-in-nozzle': {
    title: 'Shock in the nozzle',
    detail: 'a normal shock stands inside the diverging section and the flow leaves it subsonic, at ambient pressure.',
  },
  overexpanded: {
    title: 'Over-expanded',
    detail: 'the exit pressure is below ambient, so a shock pattern stands outside the exit.',
  },
  ideal: {
    title: 'Ideally expanded',
    detail: `the exit pressure matches ambient to within ${IDEAL_EXPANSION_BAND * 100} %, so the jet leaves nearly parallel.`,
  },
  underexpanded: {
    title: 'Under-expanded',
    detail: 'the exit pressure is above ambient, so the jet keeps expanding outside the exit through expansion fans.',
  },
}
