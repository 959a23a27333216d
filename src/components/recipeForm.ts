import { DEFAULT_VIBRATING_LENGTH_MM, type Instrument } from '@shared/constants'
import type { ApiError } from '@/api/client'
import type { Recipe, RecipeVersionBody, UpdateRecipeBody } from '@shared/schemas/recipes'

/** What the recipe form edits: a recipe's own fields, without what the server keeps. */
export type RecipeForm = Omit<
  Recipe,
  'id' | 'parentName' | 'createdBy' | 'createdAt' | 'updatedAt' | 'archivedAt' | 'revision'
>

/**
 * create: a new recipe; edit: this recipe changed in place (refused for construction once an
 * opened session uses it); version: a new recipe from this one, sending only what differs.
 */
export type RecipeFormMode = 'create' | 'edit' | 'version'

/** Fields a new version may change; its number and parent are the server's to set. */
export const VERSION_FIELDS = [
  'name',
  'instrument',
  'stringName',
  'core',
  'windings',
  'dampingKind',
  'dampingGrade',
  'dampingNotes',
  'gaugeMm',
  'tensionN',
  'vibratingLengthMm',
  'status',
  'notes',
] as const satisfies readonly (keyof RecipeVersionBody)[]

export const EDIT_FIELDS = [
  ...VERSION_FIELDS,
  'version',
  'parentId',
] as const satisfies readonly (keyof UpdateRecipeBody)[]

/** How the form names its fields, where the field's own name does not say it. */
export const FIELD_LABELS: Partial<Record<keyof RecipeForm, string>> = {
  stringName: 'string',
  dampingKind: 'damping',
  dampingGrade: 'damping grade',
  dampingNotes: 'damping notes',
  gaugeMm: 'gauge',
  tensionN: 'tension',
  vibratingLengthMm: 'vibrating length',
  parentId: 'derived from',
}

/** Words, not construction: these still change on a recipe that sessions have opened with. */
const FREE_FIELDS: readonly string[] = ['name', 'notes', 'status']

export function blankRecipeForm(): RecipeForm {
  return {
    name: '',
    version: 1,
    parentId: null,
    status: 'draft',
    instrument: 'violin' as Instrument,
    stringName: 'A',
    core: 'synthetic multifilament',
    windings: [],
    dampingKind: 'none',
    dampingGrade: '',
    dampingNotes: '',
    gaugeMm: null,
    tensionN: null,
    vibratingLengthMm: DEFAULT_VIBRATING_LENGTH_MM.violin,
    notes: '',
  }
}

/** A deep copy of the recipe's own fields, so editing the form never touches the list's row. */
export function recipeFormOf(recipe: Recipe): RecipeForm {
  const {
    id: _id,
    parentName: _p,
    createdBy: _c,
    createdAt: _a,
    updatedAt: _u,
    archivedAt: _x,
    revision: _r,
    ...own
  } = recipe
  return JSON.parse(JSON.stringify(own)) as RecipeForm
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b)

/** The fields among `keys` whose value in `form` differs from the recipe's, with the new values. */
export function changedFields<K extends keyof RecipeForm>(
  recipe: Recipe,
  form: RecipeForm,
  keys: readonly K[],
): Partial<Pick<RecipeForm, K>> {
  const changes: Partial<Pick<RecipeForm, K>> = {}
  for (const k of keys) {
    if (!same(recipe[k], form[k])) changes[k] = JSON.parse(JSON.stringify(form[k])) as RecipeForm[K]
  }
  return changes
}

/**
 * Whether a refused edit is the freeze of a used recipe (a new version is the way on), rather
 * than, say, a name already taken: the refusal names construction fields.
 */
export function isFrozenRefusal(err: ApiError | null): boolean {
  if (!err || err.status !== 409) return false
  return Object.keys(err.fields).some((f) => f !== '_' && !FREE_FIELDS.includes(f))
}
