import { createWriteStream } from 'node:fs'
import { rm } from 'node:fs/promises'
import { basename, dirname } from 'node:path'
import type { Request } from 'express'
import type { StorageEngine } from 'multer'
import type { ChunkChannel } from './chunk-channel'

const DISK_BUFFER_BYTES = 8 * 1024 * 1024

/** Called when the file part of an upload begins: a channel to ingest it live, or null to only store it. */
export type StartLiveIngest = (
  req: Request,
  file: Express.Multer.File,
  diskPath: string,
) => ChunkChannel | null

/**
 * multer storage that writes the file to disk, as disk storage does, and at the same time feeds
 * its chunks to a live ingest. The slower of the two sets the pace (the file stream pauses).
 */
export function liveDiskStorage(
  pathFor: (file: Express.Multer.File) => string,
  startLive: StartLiveIngest,
): StorageEngine {
  return {
    _handleFile(req, file, done) {
      const path = pathFor(file)
      let channel: ChunkChannel | null
      try {
        channel = startLive(req, file, path)
      } catch (error) {
        done(error as Error)
        return
      }
      // Room for many chunks (as much as the ingest channel holds): with a small queue the transfer
      // paused every few chunks until the disk write came back, and under load (PostgreSQL and the
      // ingest busy on both cores) those round trips held the ingest up for ~0.1 s per upload.
      const out = createWriteStream(path, { highWaterMark: DISK_BUFFER_BYTES })
      const stream = file.stream
      let size = 0
      let waits = 0
      const resume = () => {
        waits -= 1
        if (waits === 0) stream.resume()
      }
      stream.on('data', (chunk: Buffer) => {
        size += chunk.length
        if (channel && !channel.push(chunk)) {
          waits += 1
          channel.whenReady(resume)
        }
        if (!out.write(chunk)) {
          waits += 1
          out.once('drain', resume)
        }
        if (waits > 0) stream.pause()
      })
      // Over the size limit busboy cuts the file short: the live ingest must not take that for the end.
      stream.on('limit', () => channel?.fail(new Error('upload over the size limit')))
      let ended = false
      let failed = false
      // A transfer cut short (the browser went away): no ingest, and no partial file left behind.
      const fail = (error: Error) => {
        if (failed) return
        failed = true
        channel?.fail(error)
        out.destroy()
        rm(path, { force: true }).then(
          () => done(error),
          () => done(error),
        )
      }
      stream.on('error', fail)
      stream.on('close', () => {
        if (!ended) fail(new Error('upload cut short'))
      })
      stream.on('end', () => {
        ended = true
        channel?.end()
        out.end()
      })
      out.on('error', fail)
      out.on('finish', () => done(null, { path, size, filename: basename(path), destination: dirname(path) }))
    },
    _removeFile(_req, file, done) {
      rm(file.path, { force: true }).then(
        () => done(null),
        (error: Error) => done(error),
      )
    },
  }
}
