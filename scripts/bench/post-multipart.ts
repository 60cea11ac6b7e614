import { randomBytes } from 'node:crypto'
import { createReadStream, statSync } from 'node:fs'
import { request } from 'node:http'

/**
 * POSTs a multipart form the way a browser does, streaming the file from disk (fetch with a
 * FormData blob spends more time in the client than the server takes to receive).
 */
export function postMultipart(
  url: string,
  headers: Record<string, string>,
  fields: Record<string, string>,
  file: { path: string; name: string },
): Promise<{ status: number; body: string }> {
  const boundary = `----nestwise${randomBytes(12).toString('hex')}`
  const head =
    Object.entries(fields)
      .map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`)
      .join('') +
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${file.name}"\r\nContent-Type: text/csv\r\n\r\n`
  const tail = `\r\n--${boundary}--\r\n`
  const length = Buffer.byteLength(head) + statSync(file.path).size + Buffer.byteLength(tail)
  return new Promise((resolve, reject) => {
    const req = request(
      url,
      {
        method: 'POST',
        headers: {
          ...headers,
          'Content-Type': `multipart/form-data; boundary=${boundary}`,
          'Content-Length': String(length),
        },
      },
      (res) => {
        const chunks: Buffer[] = []
        res.on('data', (c: Buffer) => chunks.push(c))
        res.on('end', () =>
          resolve({ status: res.statusCode ?? 0, body: Buffer.concat(chunks).toString('utf8') }),
        )
      },
    )
    req.on('error', reject)
    req.write(head)
    const stream = createReadStream(file.path)
    stream.on('error', reject)
    stream.on('end', () => req.end(tail))
    stream.pipe(req, { end: false })
  })
}
