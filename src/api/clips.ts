import type {
  Clip,
  ClipDetail,
  ClipUploadBody,
  CreateExcerptBody,
  Excerpt,
  ListClipsQuery,
  MatchedSetSection,
  UpdateClipBody,
  UpdateExcerptBody,
} from '@shared/schemas/clips'
import type { ApiErrorBody } from '@shared/types/api'
import { api, ApiError } from './client'

/** Bytes sent so far and the total, as the browser reports them for the request body. */
export type UploadProgress = (sent: number, total: number) => void

/**
 * A multipart POST through XMLHttpRequest, the one browser API that reports upload progress.
 * Resolves with the JSON answer; a refusal becomes the same ApiError that `api` throws.
 */
function postWithProgress<T>(path: string, form: FormData, onProgress: UploadProgress) {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', `/api${path}`)
    xhr.responseType = 'json'
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded, e.total)
    xhr.onerror = () =>
      reject(new ApiError(0, 'network', 'The server cannot be reached. Check your connection.'))
    xhr.onload = () => {
      if (xhr.status >= 200 && xhr.status < 300) return resolve(xhr.response as T)
      const err = (xhr.response as ApiErrorBody | null)?.error
      reject(
        new ApiError(
          xhr.status,
          err?.code ?? 'internal',
          err?.message ?? `The server answered ${xhr.status}`,
          err?.fields,
          err?.rows,
        ),
      )
    }
    xhr.send(form)
  })
}

export const clipsApi = {
  list: (query: Partial<ListClipsQuery> = {}) => api.get<{ clips: Clip[] }>('/clips', query),
  get: (id: number) => api.get<{ clip: ClipDetail }>(`/clips/${id}`),
  update: (id: number, body: UpdateClipBody) =>
    api.patch<{ clip: ClipDetail }>(`/clips/${id}`, body),
  /** Refused (409) once a session uses the clip: archive it instead. */
  remove: (id: number) => api.del<{ id: number }>(`/clips/${id}`),
  archive: (id: number) => api.post<{ clip: ClipDetail }>(`/clips/${id}/archive`),
  restore: (id: number) => api.post<{ clip: ClipDetail }>(`/clips/${id}/restore`),
  matchedSets: () => api.get<{ sections: MatchedSetSection[] }>('/clips/matched-sets'),
  originalUrl: (id: number) => `/api/clips/${id}/original`,

  upload(file: File, fields: ClipUploadBody, onProgress: UploadProgress) {
    const form = new FormData()
    for (const [k, v] of Object.entries(fields)) {
      if (v !== undefined && v !== null) form.append(k, String(v))
    }
    form.append('file', file)
    return postWithProgress<{ clip: Clip }>('/clips', form, onProgress)
  },

  /** All files with their manifest in one request, so the server can take all or none. */
  uploadBatch(manifest: File, files: File[], onProgress: UploadProgress) {
    const form = new FormData()
    form.append('manifest', manifest)
    for (const f of files) form.append('files', f)
    return postWithProgress<{ clips: Clip[] }>('/clips/batch', form, onProgress)
  },
}

export const excerptsApi = {
  list: () => api.get<{ excerpts: Excerpt[] }>('/excerpts'),
  create: (body: CreateExcerptBody) => api.post<{ excerpt: Excerpt }>('/excerpts', body),
  update: (id: number, body: UpdateExcerptBody) =>
    api.patch<{ excerpt: Excerpt }>(`/excerpts/${id}`, body),
}
