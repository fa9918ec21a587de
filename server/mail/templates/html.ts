import type { MessageContent } from './content'

// Inline styles and tables only: mail programs strip <style> blocks and most modern CSS.
const TEAL = '#136f69'
const TEAL_DARK = '#0b3c3a'
const TINT = '#eef8f7'
const SLATE = '#334155'
const MUTED = '#64748b'
const FONT = "'Open Sans', 'Segoe UI', Arial, sans-serif"

export function escapeHtml(v: string): string {
  return v.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;')
}

const p = (text: string) => `<p style="margin:0 0 12px;font-size:15px;line-height:1.5;color:${SLATE}">${escapeHtml(text)}</p>`

function detailsTable(c: MessageContent): string {
  const rows = c.details
    .map(
      (d) =>
        `<tr><th scope="row" align="left" style="padding:6px 16px 6px ` +
        `0;font-size:13px;font-weight:600;color:${MUTED};vertical-align:top;white-space:nowrap">${escapeHtml(d.label)}</th><td ` +
        `style="padding:6px 0;font-size:15px;color:${TEAL_DARK};font-weight:600">${escapeHtml(d.value)}</td></tr>`,
    )
    .join('')
  return (
    `<table role="presentation" cellpadding="0" cellspacing="0" width="100%" style="margin:8px 0 ` +
    `20px;background:${TINT};border-left:4px solid ${TEAL};border-radius:4px"><tr><td style="padding:12px 16px"><table ` +
    `role="presentation" cellpadding="0" cellspacing="0">${rows}</table></td></tr></table>`
  )
}

function preparation(c: MessageContent): string {
  if (!c.preparation) return ''
  const items = c.preparation.map((x) => `<li style="margin:0 0 6px">${escapeHtml(x)}</li>`).join('')
  return (
    `<h2 style="margin:0 0 8px;font-size:16px;color:${TEAL_DARK}">Before you come</h2><ul style="margin:0 0 ` +
    `20px;padding-left:20px;font-size:15px;line-height:1.5;color:${SLATE}">${items}</ul>`
  )
}

function reply(c: MessageContent): string {
  if (!c.reply) return ''
  const url = escapeHtml(c.reply.url)
  return (
    `${p(c.reply.prompt)}<table role="presentation" cellpadding="0" cellspacing="0" style="margin:4px 0 8px"><tr><td ` +
    `style="background:${TEAL};border-radius:6px"><a href="${url}" style="display:inline-block;padding:12px ` +
    `22px;font-size:15px;font-weight:600;color:#ffffff;text-decoration:none">Confirm or ask to rebook</a></td></tr></table><p ` +
    `style="margin:0 0 20px;font-size:12px;color:${MUTED};word-break:break-all">Or open this address: ${url}</p>`
  )
}

/** The HTML part: one narrow column, the teal bar on top, the facts in a tinted panel. */
export function renderHtml(c: MessageContent): string {
  const k = c.clinic
  const closing = c.closing
    .map((x) => `<p style="margin:0 0 6px;font-size:13px;line-height:1.5;color:${MUTED}">${escapeHtml(x)}</p>`)
    .join('')
  const tel = escapeHtml(k.phone.replace(/\s+/g, ''))
  return `<!doctype html>
<html lang="en-GB"><head><meta charset="utf-8"><meta name="viewport"
  content="width=device-width"><title>${escapeHtml(c.subject)}</title></head>
<body style="margin:0;padding:0;background:#f1f5f9;font-family:${FONT}">
<table role="presentation" cellpadding="0" cellspacing="0" width="100%" style="background:#f1f5f9"><tr><td align="center"
  style="padding:24px 12px">
<table role="presentation" cellpadding="0" cellspacing="0" width="100%"
  style="max-width:560px;background:#ffffff;border:1px solid #e2e8f0;border-top:6px solid ${TEAL};border-radius:6px">
<tr><td style="padding:20px 28px 0">
<p style="margin:0;font-size:12px;letter-spacing:0.08em;text-transform:uppercase;color:${TEAL};font-weight:700">${escapeHtml(k.service)}</p>
<p style="margin:2px 0 0;font-size:13px;color:${MUTED}">${escapeHtml(k.name)}</p></td></tr>
<tr><td style="padding:16px 28px 8px">
<h1 style="margin:0 0 16px;font-size:22px;line-height:1.3;color:${TEAL_DARK}">${escapeHtml(c.heading)}</h1>
${p(c.greeting)}${c.intro.map(p).join('')}
${detailsTable(c)}${preparation(c)}${reply(c)}
</td></tr>
<tr><td style="padding:16px 28px 24px;border-top:1px solid #e2e8f0">${closing}
<p style="margin:10px 0 0;font-size:13px;line-height:1.5;color:${SLATE}"><strong>${escapeHtml(k.service)}</strong><br>
${escapeHtml(k.name)}<br>
Telephone <a href="tel:${tel}" style="color:${TEAL}">${escapeHtml(k.phone)}</a><br>
<a href="mailto:${escapeHtml(k.email)}" style="color:${TEAL}">${escapeHtml(k.email)}</a></p>
</td></tr></table>
</td></tr></table>
</body></html>
`
}
