import { randomBytes } from 'node:crypto'
import { spawnSync } from 'node:child_process'
import { createReadStream, statSync } from 'node:fs'
import { request } from 'node:http'
import { runTimed } from './run-timed'

type Response = { status: number; body: string }
type FileField = { path: string; name: string }

const curlInstalled = spawnSync('curl', ['--version'], { stdio: 'ignore' }).status === 0

/**
 * What sends the benchmark uploads. curl, a small C program like psql, when it is installed: the
 * benchmarks run client, server and PostgreSQL on one machine, and a Node client spent ~0.3 s of CPU
 * per 30 MB upload there (curl: a few tens of ms), slowing the server it measures.
 */
export const uploadClient = curlInstalled ? 'curl' : 'Node http (curl not installed)'

/** POSTs a multipart form the way a browser does, streaming the file from disk. */
export function postMultipart(
  url: string,
  headers: Record<string, string>,
  fields: Record<string, string>,
  file: FileField,
): Promise<Response> {
  return curlInstalled ? postWithCurl(url, headers, fields, file) : postWithNode(url, headers, fields, file)
}

async function postWithCurl(
  url: string,
  headers: Record<string, string>,
  fields: Record<string, string>,
  file: FileField,
): Promise<Response> {
  const args = ['--silent', '--show-error', '--output', '-', '--write-out', '\n%{http_code}', url]
  // No "Expect: 100-continue" round trip before the body: browsers do not send it.
  args.push('--header', 'Expect:')
  for (const [name, value] of Object.entries(headers)) args.push('--header', `${name}: ${value}`)
  // --form-string: values are sent as they are (-F would read "@…" or "<…" as a file).
  for (const [name, value] of Object.entries(fields)) args.push('--form-string', `${name}=${value}`)
  args.push('--form', `file=@${file.path};filename=${file.name};type=text/csv`)
  const run = await runTimed('curl', args, { cwd: process.cwd() })
  if (run.code !== 0) throw new Error(`curl failed (${run.code}): ${run.stderr}`)
  const cut = run.stdout.lastIndexOf('\n')
  return { status: Number(run.stdout.slice(cut + 1)), body: run.stdout.slice(0, cut) }
}

function postWithNode(
  url: string,
  headers: Record<string, string>,
  fields: Record<string, string>,
  file: FileField,
): Promise<Response> {
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
