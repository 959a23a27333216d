function escapeHtml(s: string): string {
  return s.replace(
    /[&<>"']/g,
    (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!,
  )
}

export interface MailContent {
  subject: string
  greeting: string
  paragraphs: string[]
  action?: { label: string; url: string }
  footer?: string
}

/** Every mail goes out with a plain-text part and a simple HTML part saying the same. */
export function renderMail(c: MailContent): { subject: string; text: string; html: string } {
  const text = [
    c.greeting,
    '',
    ...c.paragraphs.flatMap((p) => [p, '']),
    ...(c.action ? [`${c.action.label}: ${c.action.url}`, ''] : []),
    c.footer ?? 'Ringdown',
  ].join('\n')
  const p = (s: string) => `<p style="margin:0 0 14px">${escapeHtml(s)}</p>`
  const html = `<!doctype html><html><body style="font-family:Arial,sans-serif;color:#2b2118;background:#fbf7ef;padding:24px">
<div style="max-width:560px;margin:auto;background:#fff;border-radius:10px;padding:24px;border:1px solid #e8dcc6">
${p(c.greeting)}
${c.paragraphs.map(p).join('\n')}
${
  c.action
    ? `<p style="margin:20px 0"><a href="${escapeHtml(c.action.url)}" style="background:#b86f1e;color:#fff;padding:12px 18px;border-radius:8px;text-decoration:none;display:inline-block">${escapeHtml(c.action.label)}</a></p>
<p style="font-size:13px;color:#6b5a48">If the button does not work, copy this address into your browser: ${escapeHtml(c.action.url)}</p>`
    : ''
}
<p style="font-size:13px;color:#6b5a48;margin-top:24px">${escapeHtml(c.footer ?? 'Ringdown')}</p>
</div></body></html>`
  return { subject: c.subject, text, html }
}
