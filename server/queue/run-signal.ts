import { EventEmitter } from 'node:events'

/**
 * Tells the analysis runner of this process, if it has one, that a version was queued, so it
 * starts it now instead of at its next poll; runners in other processes poll the queue.
 */
const signal = new EventEmitter()
signal.setMaxListeners(50)

export function signalRunQueued(): void {
  signal.emit('queued')
}

export function onRunQueued(listener: () => void): () => void {
  signal.on('queued', listener)
  return () => signal.off('queued', listener)
}
