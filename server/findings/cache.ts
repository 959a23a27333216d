/**
 * Findings pages as sent (JSON text), by session and subgroup, each with the stamp it was
 * computed at. A page is served again only while its session's stamp is unchanged, so an
 * answer, an exclusion or a design change is seen on the very next request. Concurrent
 * requests for one page at one stamp share one computation.
 */
export interface FindingsCache {
  get(key: string, stamp: string, compute: () => Promise<string>): Promise<string>
  readonly size: number
}

interface Entry {
  stamp: string
  body: Promise<string>
}

export function createFindingsCache(maxEntries = 64): FindingsCache {
  // A Map keeps insertion order: re-inserting on use makes the first key the least recent.
  const entries = new Map<string, Entry>()
  return {
    get(key, stamp, compute) {
      const found = entries.get(key)
      if (found && found.stamp === stamp) {
        entries.delete(key)
        entries.set(key, found)
        return found.body
      }
      const body = compute()
      const entry = { stamp, body }
      entries.delete(key)
      entries.set(key, entry)
      // A failed computation is not kept: the next request tries again.
      body.catch(() => {
        if (entries.get(key) === entry) entries.delete(key)
      })
      while (entries.size > maxEntries) entries.delete(entries.keys().next().value!)
      return body
    },
    get size() {
      return entries.size
    },
  }
}
