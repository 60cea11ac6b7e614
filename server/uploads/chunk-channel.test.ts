import { describe, expect, it } from 'vitest'
import { ChunkChannel } from './chunk-channel'

async function collect(channel: ChunkChannel): Promise<string> {
  let text = ''
  for await (const chunk of channel) text += chunk.toString()
  return text
}

describe('ChunkChannel', () => {
  it('passes chunks through in order, lets the reader peek at the head, and ends', async () => {
    const channel = new ChunkChannel(1024)
    const reading = (async () => {
      const { head, complete } = await channel.peek(4)
      expect(head.toString()).toBe('abcd')
      expect(complete).toBe(false)
      return collect(channel)
    })()
    channel.push(Buffer.from('ab'))
    channel.push(Buffer.from('cdef'))
    channel.end()
    expect(await reading).toBe('abcdef')
  })

  it('asks the producer to pause above the high-water mark and resumes it once the reader catches up', async () => {
    const channel = new ChunkChannel(8)
    expect(channel.push(Buffer.alloc(4))).toBe(true)
    expect(channel.push(Buffer.alloc(6))).toBe(false)
    let resumed = false
    channel.whenReady(() => (resumed = true))
    expect(resumed).toBe(false)
    const iterator = channel[Symbol.asyncIterator]()
    await iterator.next()
    await iterator.next()
    expect(resumed).toBe(true)
  })

  it('hands a failure to the reader and releases a waiting producer; detached, it drops chunks', async () => {
    const channel = new ChunkChannel(4)
    channel.push(Buffer.alloc(8))
    let resumed = false
    channel.whenReady(() => (resumed = true))
    channel.fail(new Error('transfer cut short'))
    expect(resumed).toBe(true)
    await expect(collect(channel)).rejects.toThrow('transfer cut short')

    const detached = new ChunkChannel(4)
    detached.detach()
    expect(detached.push(Buffer.alloc(100))).toBe(true)
    detached.end()
    expect(await collect(detached)).toBe('')
  })
})
