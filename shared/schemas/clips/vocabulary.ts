// The words and limits of recordings: kinds, bow strokes, the base excerpts.

export const CLIP_KINDS = ['bowed', 'plucked'] as const
export type ClipKind = (typeof CLIP_KINDS)[number]
export const CLIP_KIND_LABELS: Record<ClipKind, string> = {
  bowed: 'Bowed passage',
  plucked: 'Plucked ring-out',
}

/** Offered in the form; any other short wording is accepted too. */
export const BOW_STROKES = [
  'détaché',
  'legato',
  'martelé',
  'spiccato',
  'sautillé',
  'staccato',
  'whole bows',
] as const

export const CLIP_LIMITS = {
  codeMax: 40,
  bowStrokeMax: 40,
  fileNameMax: 255,
  /** Ten years on the instrument is far beyond any string's life. */
  stringsAgeMaxDays: 3650,
  /** Files in one upload with a manifest. */
  batchMaxFiles: 200,
  /**
   * The shortest take, and so the shortest matched set: players compare clips by switching and
   * looping a region while they play, and the shortest loop is 0.5 s (BS.1534 asks for loops
   * of at least 500 ms; src/audio/syncPlayer.ts).
   */
  minSeconds: 0.5,
  /** The blind renditions are brought to this loudness (EBU R 128 programme level). */
  targetLufs: -23,
  /** No rendition sample may peak above this. */
  ceilingDbfs: -1,
  /** The extensions the upload form offers; the server trusts the bytes, not the name. */
  extensions: ['.wav', '.wave', '.flac'],
} as const

export const BASE_EXCERPTS = [
  { name: 'open string', description: 'The open string, bowed in whole bows' },
  { name: 'scale', description: 'A one-octave scale starting on the open string' },
  { name: 'phrase', description: 'A short melodic phrase with bow changes' },
  { name: 'pluck ring-out', description: 'The open string plucked once and left to ring' },
] as const
