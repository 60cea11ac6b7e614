import { SaxesParser, type SaxesTagPlain } from 'saxes'
import { badFile } from '../ingest-errors'

/**
 * Reads one XML part of a workbook as it unpacks, calling the handlers for each element and text.
 *
 * The XML parser keeps a text (or a tag) whole until it ends, so a part made of one enormous text
 * would be held in memory at once. Before the parser sees a piece, the characters since the last
 * `<` or `>` are counted: a run longer than `maxRun` stops the read with the caller's error, so the
 * parser never holds more than that. Element names are taken without a namespace prefix
 * (`x:row` is `row`), as some writers prefix the main namespace.
 */
export interface XmlHandlers {
  open(name: string, attributes: Record<string, string>): void
  text(text: string): void
  close(name: string): void
  /** After each piece of the part has been parsed: a place to hand on what it produced, with back-pressure. */
  afterPiece?(): Promise<void> | void
}

export interface XmlGuard {
  /** Longest run of characters between two markup delimiters. */
  maxRun: number
  /** What to throw when a run is longer. */
  tooLong(): Error
}

const localName = (name: string) => {
  const colon = name.indexOf(':')
  return colon < 0 ? name : name.slice(colon + 1)
}

/** Tracks the characters since the last `<` or `>` across pieces. */
class RunGuard {
  private run = 0
  constructor(private readonly guard: XmlGuard) {}

  check(piece: string): void {
    const max = this.guard.maxRun
    let pos = 0
    let nextLt = piece.indexOf('<')
    let nextGt = piece.indexOf('>')
    for (;;) {
      const next = nextLt < 0 ? nextGt : nextGt < 0 ? nextLt : Math.min(nextLt, nextGt)
      if (next < 0) {
        this.run += piece.length - pos
        if (this.run > max) throw this.guard.tooLong()
        return
      }
      if (this.run + (next - pos) > max) throw this.guard.tooLong()
      this.run = 0
      pos = next + 1
      if (next === nextLt) nextLt = piece.indexOf('<', pos)
      else nextGt = piece.indexOf('>', pos)
    }
  }
}

function notXml(): Error {
  return badFile(
    'BROKEN_WORKBOOK',
    'The workbook could not be read: one of its parts is not well-formed XML. Open it in the spreadsheet program and save it again, or export the sheet as CSV.',
  )
}

export async function readXml(
  pieces: AsyncIterable<string>,
  handlers: XmlHandlers,
  guard: XmlGuard,
): Promise<void> {
  const parser = new SaxesParser({ xmlns: false, position: false })
  let failure: Error | null = null
  parser.on('error', (error) => {
    failure ??= error
  })
  parser.on('opentag', (tag: SaxesTagPlain) => handlers.open(localName(tag.name), tag.attributes))
  parser.on('text', (text) => handlers.text(text))
  parser.on('cdata', (text) => handlers.text(text))
  parser.on('closetag', (tag: SaxesTagPlain) => handlers.close(localName(tag.name)))
  const runs = new RunGuard(guard)
  const write = (piece: string) => {
    try {
      parser.write(piece)
    } catch (error) {
      // Our own refusals (thrown by a handler) pass; anything else is the parser's complaint.
      if ((error as { status?: number }).status) throw error
      failure ??= error as Error
    }
    if (failure) throw notXml()
  }
  for await (const piece of pieces) {
    runs.check(piece)
    write(piece)
    await handlers.afterPiece?.()
  }
  try {
    parser.close()
  } catch (error) {
    if ((error as { status?: number }).status) throw error
    throw notXml()
  }
  if (failure) throw notXml()
  await handlers.afterPiece?.()
}
