/**
 * Retries a refused channel open a few times, briefly. OpenSSH frees a finished session only when its
 * channel is garbage-collected at the end of a server-loop pass (session.c / channels.c, from reading the
 * sources): our CHANNEL_CLOSE and the next CHANNEL_OPEN often arrive in one read, so the open is checked
 * against MaxSessions while the closed session still counts and is refused although the pool is within
 * the limit. One pass later the slot is free. A server that really is full keeps refusing, and the last
 * refusal is thrown as it came (TransportError "channel").
 */
import { TransportError } from "./errors";

/** Waits between attempts, in ms: about 150 ms in all, many server-loop passes. */
const RETRY_DELAYS_MS = [2, 5, 10, 20, 40, 80];

export async function retryChannelOpen<T>(attempt: () => Promise<T>): Promise<T> {
  for (let index = 0; ; index += 1) {
    try {
      return await attempt();
    } catch (error) {
      const delayMs = RETRY_DELAYS_MS[index];
      if (!(error instanceof TransportError && error.failure === "channel") || delayMs === undefined)
        throw error;
      await new Promise((resolve) => setTimeout(resolve, delayMs));
    }
  }
}
