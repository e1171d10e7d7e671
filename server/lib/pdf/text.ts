/** Text before it is drawn: characters the font lacks, and word wrap by measured width. */

/** Something that measures text, as pdf-lib's fonts do. */
export interface TextMeasure {
  widthOfTextAtSize(text: string, size: number): number
}

/** Replaces what the font cannot draw with '?', and control characters (line breaks included) with spaces. */
export function drawable(text: string, characters: ReadonlySet<number>): string {
  let out = ''
  for (const ch of text) {
    const code = ch.codePointAt(0)!
    if (code < 0x20 || (code >= 0x7f && code < 0xa0)) out += ' '
    else out += characters.has(code) ? ch : '?'
  }
  return out
}

/**
 * Greedy word wrap. Word widths are added up rather than each candidate line measured again,
 * which is exact while text is drawn one glyph per character without kerning (as pdf-lib does
 * with the fonts of fonts.ts). A word longer than the width is broken between characters.
 */
export function wrapText(text: string, font: TextMeasure, size: number, width: number): string[] {
  const lines: string[] = []
  const space = font.widthOfTextAtSize(' ', size)
  for (const paragraph of text.split(/\r\n|\r|\n/)) {
    let line = ''
    let lineWidth = 0
    for (const word of paragraph.split(/[ \t]+/)) {
      if (word === '') continue
      let wordWidth = font.widthOfTextAtSize(word, size)
      let rest = word
      if (wordWidth > width) {
        if (line) lines.push(line)
        const pieces = breakWord(rest, font, size, width)
        rest = pieces.pop() ?? ''
        lines.push(...pieces)
        line = ''
        lineWidth = 0
        wordWidth = font.widthOfTextAtSize(rest, size)
      }
      if (line && lineWidth + space + wordWidth <= width) {
        line += ` ${rest}`
        lineWidth += space + wordWidth
      } else {
        if (line) lines.push(line)
        line = rest
        lineWidth = wordWidth
      }
    }
    lines.push(line)
  }
  while (lines.length > 1 && lines[lines.length - 1] === '') lines.pop()
  return lines
}

function breakWord(word: string, font: TextMeasure, size: number, width: number): string[] {
  const pieces: string[] = []
  let piece = ''
  for (const ch of word) {
    if (piece && font.widthOfTextAtSize(piece + ch, size) > width) {
      pieces.push(piece)
      piece = ch
    } else {
      piece += ch
    }
  }
  pieces.push(piece)
  return pieces
}
