import { crc32, createDeflateRaw } from 'node:zlib'

/**
 * A small zip writer for tests and benchmarks: deflated entries whose content comes in chunks, so a
 * part that inflates to hundreds of megabytes is written without ever holding it whole. An entry can
 * declare a smaller size than it really has, the way a hostile archive lies in its table of contents.
 */
export interface ZipEntry {
  name: string
  /** The content in pieces; a string is taken as UTF-8. */
  chunks: () => Iterable<Buffer | string>
  /** Uncompressed size written into the headers instead of the real one. */
  declaredSize?: number
}

interface Written {
  name: Buffer
  crc: number
  compressed: number
  size: number
  offset: number
}

async function deflate(entry: ZipEntry): Promise<{ data: Buffer; crc: number; size: number }> {
  const deflater = createDeflateRaw({ level: 9, memLevel: 9 })
  const out: Buffer[] = []
  deflater.on('data', (chunk: Buffer) => out.push(chunk))
  const done = new Promise<void>((resolve, reject) => {
    deflater.on('end', resolve)
    deflater.on('error', reject)
  })
  let crc = 0
  let size = 0
  for (const piece of entry.chunks()) {
    const bytes = typeof piece === 'string' ? Buffer.from(piece, 'utf8') : piece
    crc = crc32(bytes, crc)
    size += bytes.length
    if (!deflater.write(bytes)) await new Promise((resolve) => deflater.once('drain', resolve))
  }
  deflater.end()
  await done
  return { data: Buffer.concat(out), crc, size }
}

/** The whole archive as one buffer (the compressed size, which stays small for the files made here). */
export async function writeZip(entries: ZipEntry[]): Promise<Buffer> {
  const parts: Buffer[] = []
  const written: Written[] = []
  let offset = 0
  for (const entry of entries) {
    const { data, crc, size } = await deflate(entry)
    const name = Buffer.from(entry.name, 'utf8')
    const declared = entry.declaredSize ?? size
    const header = Buffer.alloc(30)
    header.writeUInt32LE(0x04034b50, 0)
    header.writeUInt16LE(20, 4) // version needed
    header.writeUInt16LE(0x0800, 6) // UTF-8 names
    header.writeUInt16LE(8, 8) // deflate
    header.writeUInt32LE(0, 10) // time and date
    header.writeUInt32LE(crc >>> 0, 14)
    header.writeUInt32LE(data.length, 18)
    header.writeUInt32LE(declared, 22)
    header.writeUInt16LE(name.length, 26)
    header.writeUInt16LE(0, 28)
    parts.push(header, name, data)
    written.push({ name, crc, compressed: data.length, size: declared, offset })
    offset += header.length + name.length + data.length
  }
  const directoryStart = offset
  for (const entry of written) {
    const record = Buffer.alloc(46)
    record.writeUInt32LE(0x02014b50, 0)
    record.writeUInt16LE(20, 4)
    record.writeUInt16LE(20, 6)
    record.writeUInt16LE(0x0800, 8)
    record.writeUInt16LE(8, 10)
    record.writeUInt32LE(0, 12)
    record.writeUInt32LE(entry.crc >>> 0, 16)
    record.writeUInt32LE(entry.compressed, 20)
    record.writeUInt32LE(entry.size, 24)
    record.writeUInt16LE(entry.name.length, 28)
    record.writeUInt32LE(entry.offset, 42)
    parts.push(record, entry.name)
    offset += record.length + entry.name.length
  }
  const end = Buffer.alloc(22)
  end.writeUInt32LE(0x06054b50, 0)
  end.writeUInt16LE(written.length, 8)
  end.writeUInt16LE(written.length, 10)
  end.writeUInt32LE(offset - directoryStart, 12)
  end.writeUInt32LE(directoryStart, 16)
  parts.push(end)
  return Buffer.concat(parts)
}

/** `unit` repeated `count` times, in chunks of about a megabyte. */
export function* repeated(unit: string, count: number): Generator<string> {
  const perChunk = Math.max(1, Math.floor((1 << 20) / unit.length))
  const block = unit.repeat(perChunk)
  let left = count
  while (left >= perChunk) {
    yield block
    left -= perChunk
  }
  if (left > 0) yield unit.repeat(left)
}
