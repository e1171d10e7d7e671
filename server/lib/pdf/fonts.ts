/**
 * Lato, regular and bold, for every document. The files are read and unpacked once per process;
 * pdf-lib needs a fresh embedding per document, subset to the glyphs that document uses.
 */
import fs from 'node:fs/promises'
import { createRequire } from 'node:module'
import { inflateSync } from 'node:zlib'
import fontkit from '@pdf-lib/fontkit'
import type { PDFDocument, PDFFont } from 'pdf-lib'

/** The two weights embedded in one document, and the code points both can draw. */
export interface PdfFonts {
  regular: PDFFont
  bold: PDFFont
  /** Anything else is shown as '?' (text.ts's drawable()). */
  characters: ReadonlySet<number>
}

interface FontFiles {
  /** Plain TrueType, unpacked from the WOFF files. */
  regular: Uint8Array
  bold: Uint8Array
  characters: ReadonlySet<number>
}

/**
 * fontkit as pdf-lib sees it, with text laid out one glyph per character. pdf-lib runs fontkit's
 * whole OpenType shaper on every string it measures or draws, and that was over half the time of
 * a render (measured). pdf-lib ignores the shaper's positions (kerning) anyway, so all that is
 * given up is ligatures, which also keeps copied text plain ("fi", not one ligature glyph).
 */
const plainLayoutFontkit: Parameters<PDFDocument['registerFontkit']>[0] = {
  create(bytes, postscriptName) {
    const font = fontkit.create(bytes, postscriptName)
    const layout = (text: string) =>
      ({ glyphs: Array.from(text, (ch) => font.glyphForCodePoint(ch.codePointAt(0)!)) }) as unknown as ReturnType<typeof font.layout>
    return Object.assign(font, { layout })
  },
}

const require = createRequire(import.meta.url)
const FONT_FILES = {
  regular: '@fontsource/lato/files/lato-latin-400-normal.woff',
  bold: '@fontsource/lato/files/lato-latin-700-normal.woff',
} as const

let fontFiles: Promise<FontFiles> | null = null

function loadFontFiles(): Promise<FontFiles> {
  fontFiles ??= (async () => {
    const [regular, bold] = (
      await Promise.all([fs.readFile(require.resolve(FONT_FILES.regular)), fs.readFile(require.resolve(FONT_FILES.bold))])
    ).map(woffToSfnt) as [Uint8Array, Uint8Array]
    const boldSet = new Set(fontkit.create(bold).characterSet)
    const characters = new Set(fontkit.create(regular).characterSet.filter((c) => boldSet.has(c)))
    return { regular, bold, characters }
  })().catch((error: unknown) => {
    // A failed read is not cached, so a fixed install works without a restart.
    fontFiles = null
    throw error
  })
  return fontFiles
}

/** Embeds both weights in `doc`, regular first, each under a fixed name. */
export async function embedFonts(doc: PDFDocument): Promise<PdfFonts> {
  const files = await loadFontFiles()
  doc.registerFontkit(plainLayoutFontkit)
  // Fixed names instead of pdf-lib's random suffix keep the same input producing the same bytes.
  const regular = await doc.embedFont(files.regular, { subset: true, customName: 'Lato-Regular' })
  const bold = await doc.embedFont(files.bold, { subset: true, customName: 'Lato-Bold' })
  return { regular, bold, characters: files.characters }
}

/**
 * Unpacks a WOFF 1.0 file into the plain TrueType/OpenType font it wraps (W3C WOFF 1.0, sections
 * 3–5: a header, a table directory, each table zlib-compressed when that made it smaller).
 * fontkit can read WOFF itself, but it inflates a table again every time it reads from it: once
 * per glyph for the outlines, which was most of the time of a render (measured).
 */
function woffToSfnt(woff: Uint8Array): Uint8Array {
  const view = new DataView(woff.buffer, woff.byteOffset, woff.byteLength)
  if (woff.byteLength < 44 || view.getUint32(0) !== 0x774f4646) throw new Error('Not a WOFF 1.0 font file')
  const flavor = view.getUint32(4)
  const numTables = view.getUint16(12)
  const tables = Array.from({ length: numTables }, (_, i) => {
    const at = 44 + i * 20
    const tag = view.getUint32(at)
    const offset = view.getUint32(at + 4)
    const compLength = view.getUint32(at + 8)
    const origLength = view.getUint32(at + 12)
    const checksum = view.getUint32(at + 16)
    const stored = woff.subarray(offset, offset + compLength)
    const data = compLength < origLength ? new Uint8Array(inflateSync(stored)) : stored
    if (data.byteLength !== origLength) throw new Error('A table of the WOFF font file has the wrong length')
    return { tag, checksum, data }
  })
  // The sfnt directory is sorted by tag, as the WOFF one already is; sorting again costs nothing.
  tables.sort((a, b) => a.tag - b.tag)
  const pad = (n: number) => (n + 3) & ~3
  const headerLength = 12 + numTables * 16
  const out = new Uint8Array(tables.reduce((sum, t) => sum + pad(t.data.byteLength), headerLength))
  const outView = new DataView(out.buffer)
  const power = 2 ** Math.floor(Math.log2(numTables))
  outView.setUint32(0, flavor)
  outView.setUint16(4, numTables)
  outView.setUint16(6, power * 16)
  outView.setUint16(8, Math.log2(power))
  outView.setUint16(10, numTables * 16 - power * 16)
  let offset = headerLength
  tables.forEach((t, i) => {
    const at = 12 + i * 16
    outView.setUint32(at, t.tag)
    outView.setUint32(at + 4, t.checksum)
    outView.setUint32(at + 8, offset)
    outView.setUint32(at + 12, t.data.byteLength)
    out.set(t.data, offset)
    offset += pad(t.data.byteLength)
  })
  return out
}
