import type { FindingsTable } from '../../../shared/schemas/findings'
import type { ExportTable } from './csv'
import { interim, means, objective, omnibus, pairs } from './attributes'
import { contrasts, mixed } from './mixedModel'
import { preferences, scale } from './preferences'
import { reliability, triangle } from './panel'
import { aging } from './aging'

/**
 * Every table export by the name in its address. A new table is a name in FINDINGS_TABLES
 * and one entry here; the compiler asks for the entry.
 */
export const EXPORT_TABLES: Record<FindingsTable, ExportTable> = {
  means,
  pairs,
  omnibus,
  preferences,
  scale,
  triangle,
  reliability,
  objective,
  aging,
  interim,
  mixed,
  contrasts,
}
