import type { FormRules } from 'naive-ui'
import { zodRule } from '@/composables/formRules'
import { clipFields, type ClipKind, type ClipUploadBody } from '@shared/schemas/clips'

/** What the upload form asks once and applies to every file of the upload. */
export interface ClipDetails {
  recipeId: number | null
  excerptId: number | null
  performerCode: string
  instrumentCode: string
  kind: ClipKind
  bowStroke: string | null
  stringPlayed: string | null
  stringsAgeDays: number | null
  recordedOn: string
  notes: string
}

export function newClipDetails(): ClipDetails {
  return {
    recipeId: null,
    excerptId: null,
    performerCode: '',
    instrumentCode: '',
    kind: 'bowed',
    bowStroke: null,
    stringPlayed: null,
    stringsAgeDays: null,
    recordedOn: '',
    notes: '',
  }
}

export const clipDetailRules: FormRules = {
  recipeId: { required: true, type: 'number', message: 'Choose a recipe', trigger: 'change' },
  excerptId: { required: true, type: 'number', message: 'Choose an excerpt', trigger: 'change' },
  performerCode: [
    { required: true, message: 'Required', trigger: 'blur' },
    zodRule(clipFields.performerCode),
  ],
  instrumentCode: [
    { required: true, message: 'Required', trigger: 'blur' },
    zodRule(clipFields.instrumentCode),
  ],
  recordedOn: zodRule(clipFields.recordedOn),
}

/** The request fields; only called once the form has passed its rules. */
export function uploadFields(d: ClipDetails): ClipUploadBody {
  return {
    recipeId: d.recipeId!,
    excerptId: d.excerptId!,
    performerCode: d.performerCode,
    instrumentCode: d.instrumentCode,
    kind: d.kind,
    bowStroke: d.bowStroke ?? '',
    stringPlayed: d.stringPlayed ?? '',
    stringsAgeDays: d.stringsAgeDays,
    recordedOn: d.recordedOn || null,
    notes: d.notes,
  }
}
