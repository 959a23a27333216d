import { computed, ref } from 'vue'
import type { UploadItem } from '@/components/ClipUploadList.vue'
import { fmt } from '@/components/clipFormat'
import { clipsApi } from '@/api/clips'
import { ApiError } from '@/api/client'
import type { ClipUploadBody } from '@shared/schemas/clips'

/** The server's refusal of one file in a sentence, with the fields it named. */
function refusal(err: unknown): string {
  if (!(err instanceof ApiError)) return (err as Error).message
  const fields = Object.entries(err.fields).map(([k, v]) =>
    k === 'file' ? '' : `${k}: ${v.join('; ')}`,
  )
  return [err.message, ...fields.filter(Boolean)].join(' ')
}

/**
 * The files of one upload and how each fares: queued, sent with progress, measured, stored or
 * refused. `onUploaded` runs whenever something was stored, so the library can reload.
 */
export function useClipUpload(onUploaded: () => void) {
  const items = ref<UploadItem[]>([])
  const manifest = ref<File | null>(null)
  const busy = ref(false)
  const batchError = ref<ApiError | null>(null)
  const waiting = computed(() => items.value.filter((i) => i.state === 'waiting'))

  let counter = 0
  function addFiles(list: FileList | null | undefined) {
    for (const file of Array.from(list ?? [])) {
      if (items.value.some((i) => i.file.name === file.name && i.state !== 'done')) continue
      items.value.push({ key: `f${++counter}`, file, state: 'waiting', percent: 0, message: '' })
    }
  }
  const remove = (key: string) => (items.value = items.value.filter((i) => i.key !== key))
  function reset() {
    items.value = []
    manifest.value = null
    batchError.value = null
  }

  /** One request per file, one after another, so every file has its own bar and answer. */
  async function uploadEach(fields: () => ClipUploadBody) {
    for (const item of waiting.value) {
      item.state = 'uploading'
      try {
        const { clip } = await clipsApi.upload(item.file, fields(), (sent, total) => {
          item.percent = Math.round((sent / total) * 100)
          if (sent >= total) item.state = 'analysing'
        })
        item.state = 'done'
        item.message = `Stored as clip ${clip.id}: ${fmt.lufs(clip.loudnessLufs)}, rendition at ${fmt.lufs(clip.renditionLufs)}`
        onUploaded()
      } catch (err) {
        item.state = 'refused'
        item.message = `${refusal(err)}`
      }
    }
  }

  /** Everything in one request: the server stores all files or none. */
  async function uploadBatch() {
    const batch = waiting.value
    const sizes = batch.map((i) => i.file.size)
    const manifestSize = manifest.value!.size
    for (const item of batch) item.state = 'uploading'
    try {
      // The body carries the files in order, so bytes sent tell how far each file has gone.
      const { clips } = await clipsApi.uploadBatch(
        manifest.value!,
        batch.map((i) => i.file),
        (sent, total) => {
          let offset = manifestSize * (total / (manifestSize + sizes.reduce((a, b) => a + b, 0)))
          batch.forEach((item, k) => {
            const share = sizes[k] * (total / (manifestSize + sizes.reduce((a, b) => a + b, 0)))
            item.percent = Math.max(0, Math.min(100, Math.round(((sent - offset) / share) * 100)))
            offset += share
            if (sent >= total) item.state = 'analysing'
          })
        },
      )
      for (const item of batch) {
        const clip = clips.find((c) => c.originalName === item.file.name)
        item.state = 'done'
        item.message = clip ? `Stored as clip ${clip.id}: ${fmt.lufs(clip.loudnessLufs)}` : ''
      }
      onUploaded()
    } catch (err) {
      for (const item of batch) {
        item.state = 'refused'
        item.message = 'Nothing was stored; see the report below.'
      }
      batchError.value = err instanceof ApiError ? err : new ApiError(0, 'internal', String(err))
    }
  }

  /** Runs one upload with the modal busy; a new attempt clears the last batch report. */
  async function run(upload: () => Promise<void>) {
    busy.value = true
    batchError.value = null
    try {
      await upload()
    } finally {
      busy.value = false
    }
  }

  /** Refused files stay listed; trying again puts them back in the queue. */
  function retryRefused() {
    for (const item of items.value.filter((i) => i.state === 'refused')) {
      item.state = 'waiting'
      item.percent = 0
      item.message = ''
    }
  }

  return {
    items,
    manifest,
    busy,
    batchError,
    waiting,
    addFiles,
    remove,
    reset,
    uploadEach,
    uploadBatch,
    run,
    retryRefused,
  }
}
