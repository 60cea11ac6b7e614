import { EventEmitter } from 'node:events'

/** Tells the sender loop in this process that new mail is queued, so it need not wait for its next poll. */
const signal = new EventEmitter()
signal.setMaxListeners(50)

export function signalMailQueued(): void {
  signal.emit('queued')
}

export function onMailQueued(listener: () => void): () => void {
  signal.on('queued', listener)
  return () => signal.off('queued', listener)
}
