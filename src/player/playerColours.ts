import { palette } from '@/theme/palette'

/** The palette as CSS variables for the player's plain-HTML screens, and for the waveform. */
export function playerColours(dark: boolean) {
  const p = dark ? palette.dark : palette.light
  return {
    css: {
      '--pl-paper': p.paper,
      '--pl-card': p.card,
      '--pl-ink': p.ink,
      '--pl-muted': p.muted,
      '--pl-line': p.line,
      '--pl-amber': p.amber,
      '--pl-amber-hover': p.amberHover,
      '--pl-on-amber': dark ? p.paper : '#ffffff',
      '--pl-spruce': p.spruce,
      '--pl-varnish': p.varnish,
      '--pl-caution': p.caution,
      '--pl-slate': p.slate,
    },
    wave: {
      wave: p.muted,
      progress: p.amber,
      cursor: p.ink,
      region: `${p.amber}40`,
    },
  }
}
