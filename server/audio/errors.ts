/**
 * Stable reasons for refusing an upload. Routes map these codes to messages for the uploader, so
 * a code never changes meaning once shipped; add new ones rather than reusing old ones.
 */
export const AUDIO_ERROR_CODES = [
  'not_audio',
  'empty',
  'truncated',
  'corrupt',
  'unsupported_format',
  'too_long',
  'silent',
] as const

export type AudioErrorCode = (typeof AUDIO_ERROR_CODES)[number]

export class AudioError extends Error {
  readonly code: AudioErrorCode

  constructor(code: AudioErrorCode, message: string) {
    super(message)
    this.name = 'AudioError'
    this.code = code
  }
}

export function isAudioError(value: unknown, code?: AudioErrorCode): value is AudioError {
  return value instanceof AudioError && (code === undefined || value.code === code)
}
