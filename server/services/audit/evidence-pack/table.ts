/**
 * A small table helper over pdfkit for the evidence pack: rows that wrap within their cells, and a
 * table that continues across pages with its title ("… (continued)") and column headings drawn again
 * at the top of each new page, so every page can be read on its own.
 */
type Doc = PDFKit.PDFDocument

/** One column: its heading, its share of the page width, and its alignment. */
export interface PackColumn {
  header: string
  /** Relative width: a column of 2 is twice as wide as one of 1. */
  width: number
  align?: 'left' | 'right'
}

export const PACK_FONT = 'Helvetica'
export const PACK_FONT_BOLD = 'Helvetica-Bold'
const CELL_FONT_SIZE = 8.5
const PAD = 3
const RULE = '#bbbbbb'
const SHADE = '#e8ecef'

// The built-in PDF fonts draw Windows-1252 only: a letter outside it loses its accents when it has
// any (Ł has none, so it reads "?"), rather than printing as something else.
const WIN_ANSI_EXTRA = new Set('€‚ƒ„…†‡ˆ‰Š‹ŒŽ‘’“”•–—˜™š›œžŸ')

/** `text` as the built-in fonts can draw it: Latin-1 and Windows-1252 kept, accents stripped from the rest, anything else "?". */
export function pdfSafe(text: string): string {
  let out = ''
  for (const ch of text.normalize('NFC')) {
    if (ch.codePointAt(0)! <= 0xFF || WIN_ANSI_EXTRA.has(ch) || ch === '\n') out += ch
    else {
      const bare = ch.normalize('NFD').replace(/\p{M}/gu, '')
      out += [...bare].every(c => c.codePointAt(0)! <= 0xFF) && bare ? bare : '?'
    }
  }
  return out
}

/** The bottom of the writable area of the current page. */
function bottomOf(doc: Doc): number {
  return doc.page.height - doc.page.margins.bottom
}

/** A section heading; starts a new page when fewer than `keep` points would follow it on this one. */
export function sectionHeading(doc: Doc, title: string, keep = 60): void {
  if (doc.y + 24 + keep > bottomOf(doc)) doc.addPage()
  doc.x = doc.page.margins.left
  doc.moveDown(0.6).font(PACK_FONT_BOLD).fontSize(13).fillColor('#000000').text(pdfSafe(title)).moveDown(0.3)
}

/**
 * Draws `rows` under `columns` at the current position. A row that does not fit on the page moves to
 * a new page, which first repeats `title` with "(continued)" and the column headings. `empty` is
 * printed instead of a table without rows.
 */
export function drawTable(doc: Doc, o: { title: string, columns: PackColumn[], rows: string[][], empty: string }): void {
  const left = doc.page.margins.left
  if (!o.rows.length) {
    doc.x = left
    doc.font(PACK_FONT).fontSize(10).fillColor('#333333').text(pdfSafe(o.empty)).fillColor('#000000')
    return
  }
  const span = doc.page.width - left - doc.page.margins.right
  const share = o.columns.reduce((a, c) => a + c.width, 0)
  const widths = o.columns.map(c => (c.width / share) * span)
  const xs = widths.map((_, i) => left + widths.slice(0, i).reduce((a, w) => a + w, 0))
  const headers = o.columns.map(c => pdfSafe(c.header))

  const heightOf = (cells: string[], font: string) => {
    doc.font(font).fontSize(CELL_FONT_SIZE)
    return Math.max(...cells.map((cell, i) => doc.heightOfString(cell || ' ', { width: widths[i]! - 2 * PAD }))) + 2 * PAD
  }
  const drawRow = (cells: string[], y: number, h: number, header: boolean) => {
    if (header) doc.rect(left, y, span, h).fill(SHADE)
    doc.font(header ? PACK_FONT_BOLD : PACK_FONT).fontSize(CELL_FONT_SIZE).fillColor('#000000')
    cells.forEach((cell, i) => doc.text(cell, xs[i]! + PAD, y + PAD, { width: widths[i]! - 2 * PAD, align: o.columns[i]!.align ?? 'left', lineBreak: true }))
    doc.moveTo(left, y + h).lineTo(left + span, y + h).lineWidth(0.5).strokeColor(RULE).stroke()
  }
  const headerHeight = heightOf(headers, PACK_FONT_BOLD)
  const drawHeader = (y: number) => {
    drawRow(headers, y, headerHeight, true)
    return y + headerHeight
  }

  const cells = o.rows.map(row => row.map(pdfSafe))
  // Keep the headings with at least the first row.
  if (doc.y + headerHeight + heightOf(cells[0]!, PACK_FONT) > bottomOf(doc)) doc.addPage()
  let y = drawHeader(doc.y)
  for (const row of cells) {
    const h = heightOf(row, PACK_FONT)
    if (y + h > bottomOf(doc)) {
      doc.addPage()
      doc.x = left
      doc.font(PACK_FONT_BOLD).fontSize(11).fillColor('#000000').text(pdfSafe(`${o.title} (continued)`), left, doc.page.margins.top)
      y = drawHeader(doc.y + 4)
    }
    drawRow(row, y, h, false)
    y += h
  }
  doc.x = left
  doc.y = y + 6
}

/** Label and value lines (a summary, the club's policy settings) as a two-column table under `headers`. */
export function drawFacts(doc: Doc, title: string, headers: [string, string], facts: [string, string][]): void {
  drawTable(doc, { title, columns: [{ header: headers[0], width: 2 }, { header: headers[1], width: 3 }], rows: facts, empty: 'None recorded.' })
}
