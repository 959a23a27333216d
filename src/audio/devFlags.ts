// Switches that only a benchmark or a browser test turns on, from the page's own storage; a
// player never has them, so nothing they expose reaches a real panel.

function flag(key: string): boolean {
  try {
    return typeof localStorage !== 'undefined' && localStorage.getItem(key) !== null
  } catch {
    return false
  }
}

export const benchMode = () => flag('ringdown.bench')
export const testMode = () => flag('ringdown.test')

export interface SwitchTiming {
  /** Key press (event time stamp) to the gain ramp being scheduled on the audio clock. */
  scheduledMs: number
  /** Key press to the ramp's start at the audio output, where the browser reports it. */
  outputMs: number | null
}

declare global {
  interface Window {
    __ringdownSwitchTimes?: SwitchTiming[]
  }
}

export function recordSwitch(timing: SwitchTiming): void {
  if (!benchMode()) return
  ;(window.__ringdownSwitchTimes ??= []).push(timing)
}
