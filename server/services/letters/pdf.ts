import { createRequire } from 'node:module'
import type { ClinicContact } from '../../mail/snapshot'

/** The words of one letter, before layout; the family-doctor and appointment letters both fill it. */
export interface LetterContent {
  title: string
  /** 'Thursday 4 June 2026' */
  date: string
  recipient: string[]
  patient: { label: string; value: string }[]
  greeting: string
  sections: { heading: string; rows?: { label: string; value: string }[]; lines?: string[] }[]
  closing: string[]
  signature: string[]
  caution: string | null
  clinic: ClinicContact
}

// Open Sans from @fontsource (shipped in node_modules, SIL OFL). fontkit reads its WOFF files;
// WOFF is used rather than WOFF2 because pdfkit subsets it far smaller (about 5 kB against 22 kB).
const require = createRequire(import.meta.url)
const font = (weight: number) => require.resolve(`@fontsource/open-sans/files/open-sans-latin-${weight}-normal.woff`)
const FONTS = { regular: font(400), semibold: font(600), bold: font(700) }

// Ferrolane's deep teal (src/theme/palette.ts ferroTeal 700) and slate text.
const TEAL = '#0e5c58'
const INK = '#1e293b'
const MUTED = '#475569'
const MARGIN = 56

/** Lays a letter out on A4 and returns the PDF bytes. */
export async function renderLetterPdf(c: LetterContent, meta: { author: string; subject: string }): Promise<Buffer> {
  // Loaded on the first letter: pdfkit and its font engine hold tens of MB a server answering
  // worklists need not carry.
  const { default: PDFDocument } = await import('pdfkit')
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, bottom: MARGIN + 10, left: MARGIN, right: MARGIN },
    bufferPages: true,
    info: { Title: c.title, Author: meta.author, Subject: meta.subject, Creator: 'Ferrolane' },
  })
  const chunks: Buffer[] = []
  doc.on('data', (b: Buffer) => chunks.push(b))
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)))
    doc.on('error', reject)
  })
  doc.registerFont('regular', FONTS.regular)
  doc.registerFont('semibold', FONTS.semibold)
  doc.registerFont('bold', FONTS.bold)
  const width = doc.page.width - MARGIN * 2

  // Header: the clinic on the left, how to reach it on the right, over a teal rule.
  const top = doc.y
  doc
    .font('bold')
    .fontSize(13)
    .fillColor(TEAL)
    .text(c.clinic.name, MARGIN, top, { width: width * 0.6 })
  doc
    .font('regular')
    .fontSize(10)
    .fillColor(INK)
    .text(c.clinic.service, { width: width * 0.6 })
  const left = doc.y
  doc
    .font('regular')
    .fontSize(9)
    .fillColor(MUTED)
    .text(`Telephone ${c.clinic.phone}\n${c.clinic.email}`, MARGIN + width * 0.6, top, { width: width * 0.4, align: 'right' })
  doc.y = Math.max(left, doc.y) + 8
  doc
    .moveTo(MARGIN, doc.y)
    .lineTo(MARGIN + width, doc.y)
    .lineWidth(2)
    .strokeColor(TEAL)
    .stroke()
  doc.moveDown(1)

  doc.font('regular').fontSize(10).fillColor(INK)
  doc.text(c.recipient.join('\n'), MARGIN, doc.y, { width: width * 0.6 })
  doc.text(c.date, { width, align: 'right' })
  doc.moveDown(0.8)
  doc.font('bold').fontSize(14).fillColor(TEAL).text(c.title, { width })
  doc.moveDown(0.4)

  // Patient identifiers in a tinted panel, so they are found at a glance.
  const panelTop = doc.y
  const panelHeight = 14 * c.patient.length + 12
  doc.rect(MARGIN, panelTop, width, panelHeight).fill('#eef8f7')
  doc.fillColor(INK)
  c.patient.forEach((p, i) => {
    const y = panelTop + 6 + i * 14
    doc
      .font('semibold')
      .fontSize(10)
      .text(`${p.label}:`, MARGIN + 8, y, { width: 130 })
    doc
      .font('regular')
      .fontSize(10)
      .text(p.value, MARGIN + 140, y, { width: width - 150 })
  })
  doc.y = panelTop + panelHeight + 12
  doc.x = MARGIN

  doc.font('regular').fontSize(10.5).fillColor(INK).text(c.greeting, { width })
  for (const s of c.sections) {
    doc.moveDown(0.7)
    doc.font('bold').fontSize(11).fillColor(TEAL).text(s.heading, MARGIN, doc.y, { width })
    doc.moveDown(0.2)
    doc.fillColor(INK)
    for (const row of s.rows ?? []) {
      const y = doc.y
      doc.font('semibold').fontSize(10).text(row.label, MARGIN, y, { width: 150 })
      const after = doc.y
      doc
        .font('regular')
        .fontSize(10)
        .text(row.value, MARGIN + 155, y, { width: width - 155 })
      doc.y = Math.max(after, doc.y) + 2
    }
    for (const line of s.lines ?? []) doc.font('regular').fontSize(10).text(line, MARGIN, doc.y, { width, paragraphGap: 3 })
  }
  doc.moveDown(0.8)
  for (const line of c.closing) doc.font('regular').fontSize(10.5).text(line, MARGIN, doc.y, { width, paragraphGap: 4 })
  doc.moveDown(0.6)
  for (const line of c.signature) doc.font('semibold').fontSize(10).text(line, { width })

  if (c.caution) {
    doc.moveDown(1)
    const y = doc.y
    doc.font('regular').fontSize(8.5)
    const h = doc.heightOfString(c.caution, { width: width - 16 }) + 12
    if (y + h > doc.page.height - MARGIN - 10) doc.addPage()
    const boxTop = doc.y
    doc.rect(MARGIN, boxTop, width, h).lineWidth(0.8).strokeColor('#b45309').stroke()
    doc.fillColor(INK).text(c.caution, MARGIN + 8, boxTop + 6, { width: width - 16 })
  }

  // Footer on every page: who wrote it and the page count, so a loose page is still traceable.
  const range = doc.bufferedPageRange()
  for (let i = range.start; i < range.start + range.count; i += 1) {
    doc.switchToPage(i)
    const bottom = doc.page.height - MARGIN + 4
    doc.page.margins.bottom = 0
    doc
      .font('regular')
      .fontSize(8)
      .fillColor(MUTED)
      .text(`${meta.subject}. Written with Ferrolane by ${meta.author}. Page ${i + 1} of ${range.count}.`, MARGIN, bottom, {
        width,
        align: 'center',
        lineBreak: false,
      })
  }
  doc.end()
  return done
}
