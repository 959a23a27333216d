import type { GlobalThemeOverrides } from 'naive-ui'
import { palette } from './palette'

const font = "'Atkinson Hyperlegible', system-ui, sans-serif"

function overrides(p: (typeof palette)['light' | 'dark']): GlobalThemeOverrides {
  return {
    common: {
      fontFamily: font,
      fontFamilyMono: "ui-monospace, 'DejaVu Sans Mono', monospace",
      fontSize: '15px',
      fontSizeMedium: '15px',
      primaryColor: p.amber,
      primaryColorHover: p.amberHover,
      primaryColorPressed: p.amberPressed,
      primaryColorSuppl: p.amber,
      successColor: p.spruce,
      errorColor: p.varnish,
      warningColor: p.caution,
      infoColor: p.slate,
      bodyColor: p.paper,
      cardColor: p.card,
      modalColor: p.card,
      popoverColor: p.card,
      tableColor: p.card,
      textColorBase: p.ink,
      textColor1: p.ink,
      textColor2: p.ink,
      textColor3: p.muted,
      borderColor: p.line,
      dividerColor: p.line,
      borderRadius: '8px',
      heightMedium: '38px',
    },
    Layout: { color: p.paper, siderColor: p.card, headerColor: p.card },
    DataTable: { thColor: p.paper, tdColor: p.card },
  }
}

export const lightOverrides = overrides(palette.light)
export const darkOverrides = overrides(palette.dark)
