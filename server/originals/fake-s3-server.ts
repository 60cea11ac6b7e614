import { mkdir } from 'node:fs/promises'
import S3rver from 's3rver'

export interface RunningFakeS3 {
  endpoint: string
  port: number
  close(): Promise<void>
}

/**
 * The local stand-in for an S3 store (development and tests), like the fake SMTP server: s3rver on
 * loopback only, keeping objects as files under `dir`, with the bucket made at start. Credentials
 * are the fake's fixed pair (FAKE_S3_CREDENTIALS).
 */
export async function startFakeS3(options: {
  port: number
  dir: string
  bucket: string
}): Promise<RunningFakeS3> {
  await mkdir(options.dir, { recursive: true })
  const server = new S3rver({
    address: '127.0.0.1',
    port: options.port,
    directory: options.dir,
    silent: true,
    configureBuckets: [{ name: options.bucket, configs: [] }],
  })
  const { port } = await server.run()
  return {
    endpoint: `http://127.0.0.1:${port}`,
    port,
    close: () => server.close(),
  }
}
