import type { LiveEvent } from '@shared/schemas/live'
import { useLiveStore } from './live'

/** A decision often arrives with a confirmation and an e-mail status in the same second: one fetch for the burst. */
export const LIVE_REFRESH_DELAY_MS = 300

/**
 * The one place the estimate screens hear about changes as they happen. `caughtUp` runs after the
 * live stream was down, since events sent meanwhile are not replayed. Returns the function that stops listening.
 */
export function listenForEstimateEvents(handler: (event: LiveEvent) => void, caughtUp: () => void): () => void {
  const live = useLiveStore()
  const stops = [live.on('*', handler), live.on('reconnected', caughtUp)]
  return () => {
    for (const stop of stops) stop()
  }
}
