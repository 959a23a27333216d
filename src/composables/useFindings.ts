import { computed, reactive, ref, watch } from 'vue'
import { useRoute } from 'vue-router'
import { useMessage } from 'naive-ui'
import { findingsApi } from '@/api/findings'
import { useAsync } from '@/composables/useAsync'
import { useSessionStore } from '@/stores/session'
import type { SessionFindings } from '@shared/schemas/findings'
import { EXCLUDERS, type Instrument, type PlayerLevel } from '@shared/constants'

/**
 * The findings of the session in the route: loaded again whenever the subgroup changes, and
 * replaced by the server's recomputed findings after an exclusion or inclusion.
 */
export function useFindings() {
  const route = useRoute()
  const me = useSessionStore()
  const message = useMessage()
  const id = computed(() => Number(route.params.id))
  const findings = ref<SessionFindings | null>(null)
  const filters = reactive({
    instrument: null as Instrument | null,
    level: null as PlayerLevel | null,
  })
  const canExclude = computed(() => me.can(EXCLUDERS))

  const load = useAsync(async () => {
    findings.value = await findingsApi.get(id.value, {
      instrument: filters.instrument ?? undefined,
      level: filters.level ?? undefined,
    })
  })
  watch([id, () => filters.instrument, () => filters.level], () => load.run(), {
    immediate: true,
  })

  const change = useAsync(async (kind: 'exclude' | 'include', code: string, reason: string) => {
    findings.value =
      kind === 'exclude'
        ? await findingsApi.exclude(id.value, code, reason)
        : await findingsApi.include(id.value, code, reason)
    message.success(
      kind === 'exclude'
        ? `${code} excluded; findings recomputed`
        : `${code} included again; findings recomputed`,
    )
  })
  watch(change.error, (e) => e && message.error(e.message))

  const profile = computed(() => {
    const f = findings.value
    if (!f || f.attributes.length < 2) return null
    return {
      attributes: f.attributes.map((a) => a.name),
      recipes: f.recipes.map((r) => ({
        name: r.name,
        means: f.attributes.map((a) => a.recipes.find((m) => m.recipe === r.id)?.mean ?? null),
      })),
    }
  })
  const instrumentOptions = computed(() =>
    (findings.value?.filters.available.instruments ?? []).map((i) => ({ label: i, value: i })),
  )
  const levelOptions = computed(() =>
    (findings.value?.filters.available.levels ?? []).map((l) => ({ label: l, value: l })),
  )

  return {
    id,
    findings,
    filters,
    canExclude,
    load,
    change,
    profile,
    instrumentOptions,
    levelOptions,
  }
}
