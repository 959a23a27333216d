import { vi } from 'vitest'
import type { Clip } from '@shared/schemas/clips'
import type { Recipe } from '@shared/schemas/recipes'

/** One request as the page sent it. */
export interface SentRequest {
  method: string
  path: string
  query: URLSearchParams
  body: unknown
}

type Reply = { status?: number; body: unknown }
type Route = (req: SentRequest) => Reply | undefined

/**
 * A stand-in for the API: answers each request from the first route that takes it (404
 * otherwise) and keeps what was sent, so a test can check the requests a screen makes.
 */
export function fakeServer(...routes: Route[]) {
  const sent: SentRequest[] = []
  const fetch = vi.fn(async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = new URL(String(input), 'http://localhost')
    const req: SentRequest = {
      method: init?.method ?? 'GET',
      path: url.pathname.replace(/^\/api/, ''),
      query: url.searchParams,
      body: typeof init?.body === 'string' ? JSON.parse(init.body) : undefined,
    }
    sent.push(req)
    const reply = routes.map((r) => r(req)).find((r) => r !== undefined) ?? {
      status: 404,
      body: { error: { code: 'not_found', message: `No route for ${req.method} ${req.path}` } },
    }
    return new Response(JSON.stringify(reply.body), { status: reply.status ?? 200 })
  })
  vi.stubGlobal('fetch', fetch)
  return { sent, fetch }
}

/** A route answering one method and path (a string, or a pattern for ids). */
export const on =
  (method: string, path: string | RegExp, reply: (req: SentRequest) => Reply): Route =>
  (req) =>
    req.method === method && (typeof path === 'string' ? req.path === path : path.test(req.path))
      ? reply(req)
      : undefined

export const refusal = (message: string, fields?: Record<string, string[]>): Reply => ({
  status: 409,
  body: { error: { code: 'conflict', message, fields } },
})

export function recipe(over: Partial<Recipe> = {}): Recipe {
  return {
    id: 1,
    name: 'Harewood A plain',
    instrument: 'violin',
    stringName: 'A',
    core: 'synthetic multifilament',
    windings: [{ material: 'aluminium', profile: 'flat', wireMm: 0.08 }],
    dampingKind: 'none',
    dampingGrade: '',
    dampingNotes: '',
    gaugeMm: 0.62,
    tensionN: 52,
    vibratingLengthMm: 328,
    version: 1,
    parentId: null,
    parentName: null,
    status: 'prototype',
    notes: 'Reference build',
    revision: 3,
    archivedAt: null,
    createdBy: 'dev@example.test',
    createdAt: '2026-11-01T10:00:00.000Z',
    updatedAt: '2026-11-01T10:00:00.000Z',
    ...over,
  }
}

export function clip(over: Partial<Clip> = {}): Clip {
  return {
    id: 12,
    recipeId: 1,
    recipeName: 'Harewood A plain',
    recipeVersion: 1,
    instrument: 'violin',
    excerptId: 1,
    excerptName: 'scale',
    performerCode: 'PF-01',
    instrumentCode: 'VN-3',
    bowStroke: 'legato',
    stringPlayed: 'A',
    stringsAgeDays: 3,
    recordedOn: '2026-10-14',
    kind: 'bowed',
    notes: '',
    revision: 1,
    archivedAt: null,
    originalName: 'take-12.wav',
    renditionGainDb: -10.3,
    renditionLufs: -23,
    audioUrl: '/api/clips/12/audio',
    createdBy: 'dev@example.test',
    createdAt: '2026-11-01T10:00:00.000Z',
    container: 'wav',
    durationS: 3.85,
    sampleRate: 48000,
    channels: 1,
    bitDepth: 16,
    peakDbfs: -9,
    loudnessLufs: -12.7,
    centroidHz: 1521,
    f0Hz: 524,
    t60S: null,
    lossFactor: null,
    attackS: 0.052,
    ...over,
  }
}
