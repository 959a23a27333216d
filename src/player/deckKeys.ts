import { onBeforeUnmount, onMounted } from 'vue'

/** What a key press lands on: typing keeps its keys, a choice keeps its space bar. */
export function fieldKind(el: EventTarget | null): 'text' | 'toggle' | 'other' {
  if (!(el instanceof HTMLElement)) return 'other'
  if (el.isContentEditable || el.tagName === 'TEXTAREA' || el.tagName === 'SELECT') return 'text'
  if (el.tagName !== 'INPUT') return 'other'
  const type = (el as HTMLInputElement).type
  if (type === 'radio' || type === 'checkbox') return 'toggle'
  return ['range', 'button', 'submit'].includes(type) ? 'other' : 'text'
}

export interface DeckKeyActions {
  /** False while nothing is loaded: the keys then do nothing. */
  ready: () => boolean
  count: () => number
  choose: (i: number, since: number) => void
  toggle: () => void
}

/** Keys 1–9 switch clips and space plays or pauses, from anywhere on the page. */
export function useDeckKeys(deck: DeckKeyActions) {
  function onKey(e: KeyboardEvent) {
    const kind = fieldKind(e.target)
    if (e.altKey || e.ctrlKey || e.metaKey || kind === 'text' || !deck.ready()) return
    if (/^[1-9]$/.test(e.key)) {
      const i = Number(e.key) - 1
      if (i < deck.count()) {
        e.preventDefault()
        deck.choose(i, e.timeStamp)
      }
    } else if (e.key === ' ' && kind !== 'toggle') {
      // Space plays and pauses everywhere, also while a switch has the focus; on a choice it
      // still ticks the choice, as everywhere else on the web.
      e.preventDefault()
      deck.toggle()
    }
  }
  function onKeyUp(e: KeyboardEvent) {
    if (e.key === ' ' && fieldKind(e.target) === 'other') e.preventDefault()
  }
  onMounted(() => {
    window.addEventListener('keydown', onKey)
    window.addEventListener('keyup', onKeyUp)
  })
  onBeforeUnmount(() => {
    window.removeEventListener('keydown', onKey)
    window.removeEventListener('keyup', onKeyUp)
  })
}
