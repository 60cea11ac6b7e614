import { createReadStream } from 'node:fs'
import { rm, stat } from 'node:fs/promises'
import { Readable } from 'node:stream'
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3'
import type { S3Settings } from './originals-config'
import { SHA256_NAME, type OriginalStore } from './original-store'

const notFound = (error: unknown) =>
  error instanceof S3ServiceException &&
  (error.name === 'NoSuchKey' || error.name === 'NotFound' || error.$metadata.httpStatusCode === 404)

export function s3Client(
  settings: Pick<S3Settings, 'endpoint' | 'region' | 'forcePathStyle' | 'credentials'>,
) {
  return new S3Client({
    endpoint: settings.endpoint,
    region: settings.region,
    forcePathStyle: settings.forcePathStyle,
    credentials: settings.credentials,
    // Checksums only where S3 requires them: S3-compatible stores (and the fake) do not all know
    // the newer checksum headers, and plain uploads then stream with a known length.
    requestChecksumCalculation: 'WHEN_REQUIRED',
    responseChecksumValidation: 'WHEN_REQUIRED',
  })
}

/**
 * Originals as objects `<prefix><sha256>` in one bucket. Uploads stream from the temp file;
 * downloads stream from the bucket to the response, never held in memory whole.
 */
export function s3Store(settings: S3Settings, client: S3Client = s3Client(settings)): OriginalStore {
  const Bucket = settings.bucket
  const keyOf = (sha256: string) => `${settings.prefix}${sha256}`
  return {
    kind: 's3',
    async keep(tempPath, sha256) {
      const { size } = await stat(tempPath)
      // Written even when the object exists: the fresh write is what keeps the sweep off it.
      await client.send(
        new PutObjectCommand({
          Bucket,
          Key: keyOf(sha256),
          Body: createReadStream(tempPath),
          ContentLength: size,
          ContentType: 'application/octet-stream',
        }),
      )
      await rm(tempPath, { force: true })
    },
    async open(sha256) {
      try {
        const object = await client.send(new GetObjectCommand({ Bucket, Key: keyOf(sha256) }))
        if (!(object.Body instanceof Readable)) throw new Error('the S3 client gave no stream')
        return { stream: object.Body, size: object.ContentLength ?? 0 }
      } catch (error) {
        if (notFound(error)) return null
        throw error
      }
    },
    async exists(sha256) {
      try {
        await client.send(new HeadObjectCommand({ Bucket, Key: keyOf(sha256) }))
        return true
      } catch (error) {
        if (notFound(error)) return false
        throw error
      }
    },
    async discard(sha256) {
      await client.send(new DeleteObjectCommand({ Bucket, Key: keyOf(sha256) }))
    },
    async staleHashes(olderThanMs) {
      const cutoff = Date.now() - olderThanMs
      const out: string[] = []
      let ContinuationToken: string | undefined
      do {
        const page = await client.send(
          new ListObjectsV2Command({ Bucket, Prefix: settings.prefix, ContinuationToken }),
        )
        for (const object of page.Contents ?? []) {
          const name = (object.Key ?? '').slice(settings.prefix.length)
          if (SHA256_NAME.test(name) && object.LastModified && object.LastModified.getTime() < cutoff)
            out.push(name)
        }
        ContinuationToken = page.IsTruncated ? page.NextContinuationToken : undefined
      } while (ContinuationToken)
      return out
    },
  }
}
