/**
 * Prints one part of a page on its own, in a frame of its own: nothing around it (the staff
 * name and recipes in the page header, the other printout beside it) can reach the paper.
 */
export async function printAlone(el: HTMLElement, title: string, css: string): Promise<void> {
  const frame = document.createElement('iframe')
  frame.setAttribute('aria-hidden', 'true')
  frame.tabIndex = -1
  frame.style.cssText = 'position:fixed;right:0;bottom:0;width:0;height:0;border:0'
  document.body.appendChild(frame)
  const doc = frame.contentDocument
  const win = frame.contentWindow
  if (!doc || !win) {
    frame.remove()
    return
  }
  doc.open()
  doc.write(
    `<!doctype html><html><head><meta charset="utf-8"><base href="${location.origin}/">` +
      `<title>${escapeHtml(title)}</title><style>${fontFaces()}\n${css}</style></head>` +
      `<body>${el.outerHTML}</body></html>`,
  )
  doc.close()
  // QR codes are images: printing before they are decoded would leave empty squares.
  await Promise.all(
    [...doc.images].map((img) =>
      img.complete ? null : new Promise((done) => (img.onload = img.onerror = done)),
    ),
  )
  const remove = () => frame.remove()
  win.addEventListener('afterprint', remove)
  setTimeout(remove, 60_000)
  win.focus()
  win.print()
}

function escapeHtml(text: string): string {
  return text.replace(/[&<>"]/g, (c) => `&#${c.charCodeAt(0)};`)
}

/** The app's own font faces, so the printout keeps the typeface of the screen. */
function fontFaces(): string {
  const rules: string[] = []
  for (const sheet of [...document.styleSheets]) {
    try {
      for (const rule of [...sheet.cssRules])
        if (rule.cssText.startsWith('@font-face')) rules.push(rule.cssText)
    } catch {
      // A sheet from another origin cannot be read; the fallback fonts serve.
    }
  }
  return rules.join('\n')
}
