// `npm run bench`: one line per figure, `name: value unit (target …)`; `-- --json` for JSON.
import type { Figure } from './figure'
import { findingsFigures } from './findings'
import { findingsHttpFigures } from './findingsHttp'
import { clipAnalysisFigures } from './clipAnalysis'
import { playerPageFigures } from './playerPage'
import { submissionFigures } from './submissions'
import { uploadMemoryFigures } from './uploadMemory'
import { savesDuringUploadFigures } from './savesDuringUpload'

const suites: [string, () => Figure[] | Promise<Figure[]>][] = [
  ['findings', findingsFigures],
  ['findings-http', findingsHttpFigures],
  ['audio', clipAnalysisFigures],
  ['player', playerPageFigures],
  ['submissions', submissionFigures],
  ['upload', uploadMemoryFigures],
  ['saves-upload', savesDuringUploadFigures],
]

const json = process.argv.includes('--json')
const only = process.argv.find((a) => a.startsWith('--only='))?.slice('--only='.length)
const figures: Figure[] = []
for (const [name, run] of suites) {
  if (only && only !== name) continue
  for (const f of await run()) {
    figures.push(f)
    if (!json) console.log(`${f.name}: ${f.value} ${f.unit} (target ${f.target})`)
  }
}
if (json) console.log(JSON.stringify({ figures }))
// Servers and browsers the suites started are closed; leave no handle keeping the process up.
process.exit(0)
