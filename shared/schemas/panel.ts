import { z } from 'zod'
import { INSTRUMENTS, LIMITS, PLAYER_LEVELS, PLAYER_STATUSES } from '../constants'
import { email, isoDate, personName } from './common'
import { namesAChange, revision } from './revision'

const instruments = z
  .array(z.enum(INSTRUMENTS, `Instruments are ${INSTRUMENTS.join(', ')}`))
  .min(1, 'At least one instrument')
  .max(INSTRUMENTS.length)
  .refine((a) => new Set(a).size === a.length, 'An instrument is listed twice')

export const playerFields = {
  name: personName,
  email,
  instruments,
  level: z.enum(PLAYER_LEVELS, `Level is one of ${PLAYER_LEVELS.join(', ')}`),
  region: z.string().trim().max(LIMITS.regionMax, `At most ${LIMITS.regionMax} characters`),
  consentDate: isoDate.nullable(),
  notes: z.string().trim().max(LIMITS.notesMax, `At most ${LIMITS.notesMax} characters`),
}

export const createPlayerBody = z.strictObject({
  ...playerFields,
  region: playerFields.region.default(''),
  consentDate: playerFields.consentDate.default(null),
  notes: playerFields.notes.default(''),
})
export type CreatePlayerBody = z.input<typeof createPlayerBody>

export const updatePlayerBody = z
  .strictObject({
    name: playerFields.name.optional(),
    email: playerFields.email.optional(),
    instruments: playerFields.instruments.optional(),
    level: playerFields.level.optional(),
    region: playerFields.region.optional(),
    consentDate: playerFields.consentDate.optional(),
    notes: playerFields.notes.optional(),
    status: z.enum(['active', 'inactive'], 'Choose active or inactive').optional(),
    revision,
  })
  .refine(namesAChange, 'Nothing to change')
export type UpdatePlayerBody = z.infer<typeof updatePlayerBody>

export const PLAYER_SORTS = ['name', 'level', 'region', 'consentDate', 'createdAt', 'code'] as const

export const listPlayersQuery = z.object({
  q: z.string().trim().max(LIMITS.searchMax).optional(),
  instrument: z.enum(INSTRUMENTS).optional(),
  level: z.enum(PLAYER_LEVELS).optional(),
  status: z.enum([...PLAYER_STATUSES, 'all']).default('active'),
  sort: z.enum(PLAYER_SORTS).default('name'),
  order: z.enum(['asc', 'desc']).default('asc'),
})
export type ListPlayersQuery = z.infer<typeof listPlayersQuery>

/** One row of a panel CSV: instruments separated by ";" or "|" inside their cell. */
export const playerCsvRow = z.strictObject({
  name: playerFields.name,
  email: playerFields.email,
  instruments: z
    .string()
    .trim()
    .min(1, 'At least one instrument')
    .transform((s) =>
      s
        .split(/[;|]/)
        .map((x) => x.trim().toLowerCase())
        .filter(Boolean),
    )
    .pipe(instruments),
  level: z.string().trim().toLowerCase().pipe(playerFields.level),
  region: playerFields.region.default(''),
  consent_date: z
    .string()
    .trim()
    .transform((s) => (s === '' ? null : s))
    .pipe(isoDate.nullable())
    .default(null),
  notes: playerFields.notes.default(''),
})
export const PLAYER_CSV_COLUMNS = [
  'name',
  'email',
  'instruments',
  'level',
  'region',
  'consent_date',
  'notes',
] as const

export interface Player {
  id: number
  code: string
  name: string | null
  email: string | null
  instruments: string[]
  level: (typeof PLAYER_LEVELS)[number]
  region: string
  consentDate: string | null
  notes: string
  status: (typeof PLAYER_STATUSES)[number]
  /** Moves on with every change; an edit sends the one it was loaded at. */
  revision: number
  createdAt: string
  updatedAt: string
}

export interface CsvRowError {
  row: number
  errors: string[]
}

export interface PanelSummary {
  total: number
  byInstrument: Record<string, number>
  byLevel: Record<string, number>
  byStatus: Record<string, number>
}
