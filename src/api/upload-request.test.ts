import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { FakeXhr, loadEvent } from '@/testing/fake-xhr'
import { ApiError } from './http'
import { postMultipart } from './upload-request'

beforeEach(() => {
  FakeXhr.sent = []
  vi.stubGlobal('XMLHttpRequest', FakeXhr)
})
afterEach(() => vi.unstubAllGlobals())

const form = () => {
  const data = new FormData()
  data.append('labId', '1')
  return data
}

describe('postMultipart', () => {
  it('posts the form with the CSRF header and extra headers, reports progress, and resolves with data', async () => {
    const transfers: number[] = []
    let sent = false
    const pending = postMultipart<{ id: number }>('/api/v1/datasets', form(), {
      headers: { 'x-upload-token': 'tok12345' },
      onTransfer: (p) => transfers.push(p.loaded / p.total),
      onSent: () => (sent = true),
    })
    const xhr = FakeXhr.sent[0]
    expect(xhr.method).toBe('POST')
    expect(xhr.url).toBe('/api/v1/datasets')
    expect(xhr.headers['X-Requested-With']).toBe('nestwise')
    expect(xhr.headers['x-upload-token']).toBe('tok12345')
    expect(xhr.body).toBeInstanceOf(FormData)

    xhr.progress(500, 2000)
    xhr.progress(2000, 2000)
    xhr.finishUpload()
    expect(transfers).toEqual([0.25, 1])
    expect(sent).toBe(true)

    xhr.respond(201, { data: { id: 7 } })
    await expect(pending).resolves.toEqual({ id: 7 })
  })

  it('turns the error answer into an ApiError with the server message and details', async () => {
    const pending = postMultipart('/api/v1/datasets', form())
    FakeXhr.sent[0].respond(400, {
      error: {
        code: 'INVALID_PAYLOAD',
        message: 'Row 3 has 4 values.',
        details: { reason: 'RAGGED_ROW', row: 3 },
      },
    })
    const error = await pending.catch((e: unknown) => e)
    expect(error).toBeInstanceOf(ApiError)
    expect(error).toMatchObject({ status: 400, code: 'INVALID_PAYLOAD', message: 'Row 3 has 4 values.' })
    expect((error as ApiError).details).toEqual({ reason: 'RAGGED_ROW', row: 3 })
  })

  it('falls back to a plain message when the answer is not the API error shape', async () => {
    const pending = postMultipart('/api/v1/datasets', form())
    FakeXhr.sent[0].status = 413
    FakeXhr.sent[0].responseText = '<html>too big</html>'
    FakeXhr.sent[0].onload?.(loadEvent())
    await expect(pending).rejects.toMatchObject({ status: 413, code: 'PAYLOAD_TOO_LARGE' })
  })

  it('reports a dropped connection as a network error', async () => {
    const pending = postMultipart('/api/v1/datasets', form())
    FakeXhr.sent[0].failNetwork()
    await expect(pending).rejects.toMatchObject({ status: 0, code: 'NETWORK' })
  })

  it('rejects with an AbortError when the caller cancels', async () => {
    const controller = new AbortController()
    const pending = postMultipart('/api/v1/datasets', form(), { signal: controller.signal })
    const outcome = expect(pending).rejects.toMatchObject({ name: 'AbortError' })
    controller.abort()
    await outcome
  })
})
