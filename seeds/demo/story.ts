import type { SessionFormat } from '../../shared/schemas/sessions'

/*
 * The demo sessions of Larchmere String Works, an invented string maker, in every state: a
 * draft, an open rating session with players part-way (one passed the headphone check on the
 * retry, one failed it twice and is left out of its findings), a closed triangle test everybody
 * finished, and a play-test followed over time; and two closed sessions whose findings tell a
 * story (a clear brightness effect, no warmth difference, one player answering at random; a
 * lean towards the light compound). Days count from the day the demo is seeded.
 */

export interface DemoSession {
  name: string
  purpose: string
  format: SessionFormat
  status: 'draft' | 'open' | 'closed'
  recipes: string[]
  /** [excerpt, performer, instrument] of each matched set. */
  sets: [string, string, string][]
  duplicates: number
  deadlineDays: number
  /** What players see: neutral words that pass the player-words check. */
  playerTitle: string
  playerMessage: string
  players: string[]
  /** Answers given per player, by invitation order; 'all' marks the player done. */
  progress: (number | 'all')[]
  label?: string
  parent?: string
  /** Rated answers follow DAMPING_PROFILE closely instead of a loose lean. */
  profiled?: boolean
  /** Invitation index of a player who answers at random (the reliability flag's demo). */
  randomPlayer?: number
  /**
   * Failed attempts at the headphone check, by invitation index (everyone else passes at the
   * first): 1 fails, waits out the pause and passes the retry; 2 fails both and goes on flagged.
   */
  headphoneFailures?: Record<number, number>
}

const VIOLINISTS = ['ilse.marchetti', 'noor.halloran', 'saskia.lindqvist', 'wren.adebayo']
const MORE_VIOLINISTS = ['zelda.okonkwo', 'caspian.mbeki', 'freya.nakamura-holt', 'hana.castellane']
const CELLISTS = ['kofi.brandvold', 'tarek.villanueva', 'anselm.fairweather', 'emrys.kowalczyk']
const LISTENING_PANEL = [
  ...VIOLINISTS,
  ...MORE_VIOLINISTS,
  'lior.ferreira-quist',
  'yusuf.kaminski',
  'dalia.strand',
  'ivo.renshaw',
]
const AUREL = [
  'Aurel A bare',
  'Aurel A light compound',
  'Aurel A heavy compound',
  'Aurel A fibre wrap',
]

export const SESSIONS: DemoSession[] = [
  {
    name: 'Aurel A compound weight: which do players prefer?',
    purpose: 'Does a heavier compound cost the A string its preference among professionals?',
    format: 'pair',
    status: 'draft',
    recipes: AUREL.slice(0, 3),
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 1,
    deadlineDays: 30,
    playerTitle: 'Spring listening, which do you prefer?',
    playerMessage:
      'Listen to both recordings as often as you like, then choose the one you prefer.',
    players: [],
    progress: [],
  },
  {
    name: 'Aurel A damping treatments: brightness, response, warmth',
    purpose: 'Profile the four damping treatments on the default attributes.',
    format: 'rating',
    status: 'open',
    recipes: AUREL,
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 2,
    deadlineDays: 12,
    playerTitle: 'Winter listening round',
    playerMessage: 'Use headphones in a quiet room. Rate each recording on every scale.',
    players: [...VIOLINISTS, ...MORE_VIOLINISTS],
    progress: ['all', 6, 2, 0],
    headphoneFailures: { 1: 1, 2: 2 },
  },
  {
    name: 'Tessel D: can players hear round against flat winding?',
    purpose: 'A triangle test before any preference work on the cello D.',
    format: 'triangle',
    status: 'closed',
    recipes: ['Tessel D round', 'Tessel D flat'],
    sets: [
      ['scale', 'PF-01', 'VC-1'],
      ['phrase', 'PF-02', 'VC-1'],
    ],
    duplicates: 1,
    deadlineDays: -5,
    playerTitle: 'Cello listening: the odd one out',
    playerMessage: 'Two of the three recordings are of the same string. Pick the one that differs.',
    players: CELLISTS,
    progress: ['all', 'all', 'all', 'all'],
  },
  {
    name: 'Aurel A on your own violin',
    purpose: 'How the damping treatments play in, followed over the first weeks.',
    format: 'playtest',
    status: 'closed',
    recipes: ['Aurel A bare', 'Aurel A heavy compound', 'Aurel A fibre wrap'],
    sets: [],
    duplicates: 0,
    deadlineDays: -10,
    playerTitle: 'Strings to try at home, first fitting',
    playerMessage:
      'Fit each coded set in the order on your sheet, play it for two days, then rate it.',
    players: VIOLINISTS,
    progress: ['all', 'all', 'all', 'all'],
    label: 'day 0',
  },
  {
    name: 'Aurel A on your own violin',
    purpose: 'How the damping treatments play in, followed over the first weeks.',
    format: 'playtest',
    status: 'open',
    recipes: ['Aurel A bare', 'Aurel A heavy compound', 'Aurel A fibre wrap'],
    sets: [],
    duplicates: 0,
    deadlineDays: 20,
    playerTitle: 'Strings to try at home, two weeks on',
    playerMessage:
      'Fit each coded set in the order on your sheet, play it for two days, then rate it.',
    players: VIOLINISTS,
    progress: [1],
    label: 'week 2',
    parent: 'day 0',
  },
  {
    name: 'Aurel A damping treatments: first listening round',
    purpose: 'Does damping darken the A string, and does it cost warmth?',
    format: 'rating',
    status: 'closed',
    recipes: AUREL,
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 2,
    deadlineDays: -20,
    playerTitle: 'Evening listening, autumn round',
    playerMessage: 'Use headphones in a quiet room. Rate each recording on every scale.',
    players: LISTENING_PANEL,
    progress: LISTENING_PANEL.map(() => 'all'),
    profiled: true,
    randomPlayer: 6,
  },
  {
    name: 'Aurel A compound weight: preference round one',
    purpose: 'Which damping level do players prefer on the A string, and which sounds brighter?',
    format: 'pair',
    status: 'closed',
    recipes: AUREL.slice(0, 3),
    sets: [
      ['scale', 'PF-01', 'VN-3'],
      ['phrase', 'PF-02', 'VN-3'],
    ],
    duplicates: 1,
    deadlineDays: -30,
    playerTitle: 'Which do you prefer? Late summer round',
    playerMessage:
      'Listen to both recordings as often as you like, then choose the one you prefer.',
    players: LISTENING_PANEL.slice(0, 10),
    progress: LISTENING_PANEL.slice(0, 10).map(() => 'all'),
  },
]

/**
 * Panel means the closed listening round is built around, by recipe order (bare, light
 * compound, heavy compound, fibre wrap): brightness falls with damping, bow response rises,
 * warmth does not move.
 */
export const DAMPING_PROFILE: Record<string, number[]> = {
  brightness: [78, 60, 40, 58],
  bow_response: [42, 52, 66, 55],
  warmth: [55, 55, 55, 55],
}
/** Invented preference strengths (Bradley–Terry log abilities) for the pair round. */
export const PREFERENCE_STRENGTH = [0, 1.4, -0.6]
