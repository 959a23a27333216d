import { z } from 'zod'
import {
  CORES,
  DAMPING_KINDS,
  INSTRUMENTS,
  ARCHIVED_FILTERS,
  LIMITS,
  RECIPE_STATUSES,
  TUNINGS,
  WINDING_MATERIALS,
  WINDING_PROFILES,
  type Instrument,
} from '../constants'
import { visibleText } from './visibleText'
import { namesAChange, revision } from './revision'

export const windingLayer = z.strictObject({
  material: z.enum(WINDING_MATERIALS, `Material is one of ${WINDING_MATERIALS.join(', ')}`),
  profile: z.enum(WINDING_PROFILES, 'Profile is round or flat'),
  wireMm: z
    .number('Wire size in mm')
    .positive('Wire size must be above 0 mm')
    .max(2, 'Wire size above 2 mm is not a winding'),
})
export type WindingLayer = z.infer<typeof windingLayer>

const recipeFields = {
  name: visibleText(z.string().trim().min(1, 'Required').max(LIMITS.nameMax)),
  instrument: z.enum(INSTRUMENTS, `Instrument is one of ${INSTRUMENTS.join(', ')}`),
  stringName: z.string().trim().min(1, 'Required').max(4),
  core: z.enum(CORES, `Core is one of ${CORES.join(', ')}`),
  windings: z.array(windingLayer).max(8, 'At most 8 winding layers'),
  dampingKind: z.enum(DAMPING_KINDS, `Damping is one of ${DAMPING_KINDS.join(', ')}`),
  dampingGrade: z.string().trim().max(60),
  dampingNotes: z.string().trim().max(LIMITS.notesMax),
  // Gauges of bowed strings run from about 0.25 mm (violin E) to about 3 mm (bass E).
  gaugeMm: z.number().min(0.1, 'Gauge below 0.1 mm').max(5, 'Gauge above 5 mm').nullable(),
  tensionN: z.number().min(1, 'Tension below 1 N').max(600, 'Tension above 600 N').nullable(),
  vibratingLengthMm: z
    .number('Vibrating length in mm')
    .min(200, 'Vibrating length below 200 mm')
    .max(1200, 'Vibrating length above 1200 mm'),
  version: z.number().int().min(1).max(999),
  parentId: z.number().int().positive().nullable(),
  status: z.enum(RECIPE_STATUSES, `Status is one of ${RECIPE_STATUSES.join(', ')}`),
  notes: z.string().trim().max(LIMITS.notesMax),
}

function stringOfInstrument(
  b: { instrument?: Instrument; stringName?: string },
  ctx: z.RefinementCtx,
) {
  if (!b.instrument || !b.stringName) return
  const names = TUNINGS[b.instrument].map((s) => s.name)
  if (!names.includes(b.stringName)) {
    ctx.addIssue({
      code: 'custom',
      path: ['stringName'],
      message: `A ${b.instrument} has the strings ${names.join(', ')}`,
    })
  }
}

export const createRecipeBody = z
  .strictObject({
    ...recipeFields,
    windings: recipeFields.windings.default([]),
    dampingKind: recipeFields.dampingKind.default('none'),
    dampingGrade: recipeFields.dampingGrade.default(''),
    dampingNotes: recipeFields.dampingNotes.default(''),
    gaugeMm: recipeFields.gaugeMm.default(null),
    tensionN: recipeFields.tensionN.default(null),
    version: recipeFields.version.default(1),
    parentId: recipeFields.parentId.default(null),
    status: recipeFields.status.default('draft'),
    notes: recipeFields.notes.default(''),
  })
  .superRefine(stringOfInstrument)
export type CreateRecipeBody = z.input<typeof createRecipeBody>

const changeFields = {
  name: recipeFields.name.optional(),
  instrument: recipeFields.instrument.optional(),
  stringName: recipeFields.stringName.optional(),
  core: recipeFields.core.optional(),
  windings: recipeFields.windings.optional(),
  dampingKind: recipeFields.dampingKind.optional(),
  dampingGrade: recipeFields.dampingGrade.optional(),
  dampingNotes: recipeFields.dampingNotes.optional(),
  gaugeMm: recipeFields.gaugeMm.optional(),
  tensionN: recipeFields.tensionN.optional(),
  vibratingLengthMm: recipeFields.vibratingLengthMm.optional(),
  status: recipeFields.status.optional(),
  notes: recipeFields.notes.optional(),
}
export const updateRecipeBody = z
  .strictObject({
    ...changeFields,
    version: recipeFields.version.optional(),
    parentId: recipeFields.parentId.optional(),
    revision,
  })
  .refine(namesAChange, 'Nothing to change')
export type UpdateRecipeBody = z.infer<typeof updateRecipeBody>

/**
 * POST /api/recipes/:id/versions: what the new version changes; everything else is copied, it
 * gets the next version number and the recipe as its parent.
 */
export const recipeVersionBody = z
  .strictObject(changeFields)
  .refine((b) => Object.keys(b).length > 0, 'Say what the new version changes')
export type RecipeVersionBody = z.infer<typeof recipeVersionBody>

export const listRecipesQuery = z.object({
  q: z.string().trim().max(LIMITS.searchMax).optional(),
  instrument: z.enum(INSTRUMENTS).optional(),
  stringName: z.string().trim().max(4).optional(),
  core: z.enum(CORES).optional(),
  dampingKind: z.enum(DAMPING_KINDS).optional(),
  status: z.enum([...RECIPE_STATUSES, 'all']).default('all'),
  /** Archived recipes are hidden unless asked for. */
  archived: z.enum(ARCHIVED_FILTERS).default('hide'),
})
export type ListRecipesQuery = z.infer<typeof listRecipesQuery>

export const recipeFieldSchemas = recipeFields

export interface Recipe {
  id: number
  name: string
  instrument: Instrument
  stringName: string
  core: (typeof CORES)[number]
  windings: WindingLayer[]
  dampingKind: (typeof DAMPING_KINDS)[number]
  dampingGrade: string
  dampingNotes: string
  gaugeMm: number | null
  tensionN: number | null
  vibratingLengthMm: number
  version: number
  parentId: number | null
  parentName: string | null
  status: (typeof RECIPE_STATUSES)[number]
  notes: string
  /** Moves on with every change; an edit sends the one it was loaded at. */
  revision: number
  /** Set when archived: hidden from lists and pickers, kept for the sessions that use it. */
  archivedAt: string | null
  createdBy: string | null
  createdAt: string
  updatedAt: string
}
