import { computed, onBeforeUnmount, onMounted, ref, shallowRef, watch, type Ref } from 'vue'
import type { PlayerClipView } from '@shared/schemas/rating'
import { audioContext, wakeAudio } from '@/audio/audioContext'
import { loadClips } from '@/audio/clipLoader'
import { SyncPlayer, type LoopRegion } from '@/audio/syncPlayer'

/**
 * The clips of one trial on one synchronized player: every clip is loaded before anything
 * plays, and the reactive state follows the player once a frame while it plays.
 */
export function useSyncPlayback(clips: () => PlayerClipView[], selected: Ref<number>) {
  const player = shallowRef<SyncPlayer | null>(null)
  const loading = ref(true)
  const failed = ref<string | null>(null)
  const progress = ref(0)
  const playing = ref(false)
  const position = ref(0)
  const loop = ref<LoopRegion | null>(null)
  const duration = computed(() => player.value?.duration ?? 0)
  let abort: AbortController | null = null
  let frame = 0

  function sync() {
    const p = player.value
    if (!p) return
    playing.value = p.playing
    loop.value = p.loop
    position.value = p.position()
    if (p.selected !== selected.value) selected.value = p.selected
    cancelAnimationFrame(frame)
    if (p.playing) frame = requestAnimationFrame(sync)
  }

  async function load() {
    abort?.abort()
    abort = new AbortController()
    player.value?.dispose()
    player.value = null
    loading.value = true
    failed.value = null
    progress.value = 0
    try {
      const buffers = await loadClips(
        audioContext(),
        clips().map((c) => c.audioUrl),
        (p) => (progress.value = p.total ? p.loaded / p.total : 0),
        abort.signal,
      )
      const p = new SyncPlayer(audioContext(), buffers)
      p.select(Math.min(selected.value, buffers.length - 1))
      p.onChange(sync)
      player.value = p
      sync()
    } catch (err) {
      if ((err as Error).name === 'AbortError') return
      failed.value =
        (err as Error).message || 'The recordings could not be loaded. Check your connection.'
    } finally {
      loading.value = false
    }
  }

  async function toggle() {
    await wakeAudio()
    player.value?.toggle()
  }

  function choose(i: number, since?: number) {
    player.value?.select(i, since)
    selected.value = i
  }

  function setLoop(region: LoopRegion | null) {
    player.value?.setLoop(region)
  }
  function loopStartHere() {
    const p = player.value
    if (!p) return
    const at = p.position()
    setLoop({ start: at, end: Math.max(p.loop?.end ?? p.loopLimit, at + 0.5) })
  }
  function loopEndHere() {
    const p = player.value
    if (!p) return
    const at = p.position()
    setLoop({ start: Math.min(p.loop?.start ?? 0, at - 0.5), end: at })
  }

  watch(selected, (i) => {
    if (player.value && player.value.selected !== i) player.value.select(i)
  })
  watch(
    () =>
      clips()
        .map((c) => c.audioUrl)
        .join(' '),
    () => void load(),
  )
  onMounted(() => void load())
  onBeforeUnmount(() => {
    cancelAnimationFrame(frame)
    abort?.abort()
    player.value?.dispose()
  })

  return {
    player,
    loading,
    failed,
    progress,
    playing,
    position,
    loop,
    duration,
    load,
    toggle,
    choose,
    setLoop,
    loopStartHere,
    loopEndHere,
  }
}
