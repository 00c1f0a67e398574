/**
 * State shared between the nodes of one service, in Redis, when `REDIS_URL` is set:
 *
 * - rate-limit counters: one `rate-limit-redis` store per limiter, each under its own key prefix
 *   (`ebullio:rl:<limiter>:`), so N nodes together allow a client the limit, not N times it;
 * - key-cache invalidation: whenever something authentication reads changes through this node's
 *   database connection, a message on the channel {@link AUTH_CHANGED_CHANNEL}; every other node
 *   drops its remembered keys when it arrives (server/accounts/keys.ts `forgetKnownKeys`).
 *
 * Failure behaviour (decided, see DEVELOPERS.md "Shared state between nodes"): commands are never
 * queued while the connection is down and time out after {@link COMMAND_TIMEOUT_MS}; a limiter
 * whose store fails throws {@link SharedStateUnavailableError}, which the HTTP layer answers with
 * a 503 problem and Retry-After (fail closed: never an unlimited door, never a 500). The client
 * reconnects by itself; the key cache keeps checking the database's auth_revision on every turn
 * whether the subscriber is up or not, so a lost message never lets a revoked key through.
 */
import crypto from 'node:crypto';
import type { ClientRateLimitInfo, IncrementResponse, Options as RateLimitOptions } from 'express-rate-limit';
import { RedisStore, type RedisReply } from 'rate-limit-redis';
import { createClient } from 'redis';

/** The pub/sub channel of key-cache invalidations. */
export const AUTH_CHANGED_CHANNEL = 'ebullio:auth-changed';
/** Every key this service writes starts with this. */
export const KEY_PREFIX = 'ebullio:';
/** A limiter decision waits at most this long for Redis before the request is answered 503. */
export const COMMAND_TIMEOUT_MS = 1_000;
/** Retry-After (seconds) of the 503 answered while Redis cannot be reached. */
export const SHARED_STATE_RETRY_AFTER_S = 5;

/** Redis could not be asked (down, timed out, refused): the caller must fail closed. */
export class SharedStateUnavailableError extends Error {
  override readonly name = 'SharedStateUnavailableError';
  constructor(cause: unknown) {
    super(`shared state (Redis) unavailable: ${(cause as Error)?.message ?? String(cause)}`, { cause });
  }
}

/**
 * A rate-limit-redis store that survives an outage: the package loads its Lua scripts once, at
 * init, and would await that failed load forever if Redis was down then; this store reloads them
 * after any failure, and turns every failure into {@link SharedStateUnavailableError}.
 */
class ResilientRedisStore extends RedisStore {
  /** The last script load failed (Redis down, or not yet connected): load again before the next use. */
  private scriptsFailed = true;

  private reloadScripts(): void {
    this.scriptsFailed = false;
    this.incrementScriptSha = this.loadIncrementScript();
    this.getScriptSha = this.loadGetScript();
    const failed = () => {
      this.scriptsFailed = true;
    };
    // A failed load is reported by the command that awaits it, and retried before the next one.
    this.incrementScriptSha.catch(failed);
    this.getScriptSha.catch(failed);
  }

  override async init(options: RateLimitOptions): Promise<void> {
    // Called when the limiter is built, usually before the connection is up: load lazily.
    this.windowMs = options.windowMs;
  }

  /**
   * Runs a store command, bounded by {@link COMMAND_TIMEOUT_MS}: node-redis's own command timeout
   * covers only the wait to be written, not the wait for the reply of a Redis that hangs. A reply
   * that comes later still counts in Redis; this request has been refused by then.
   */
  private async guarded<T>(run: () => Promise<T>): Promise<T> {
    if (this.scriptsFailed) this.reloadScripts();
    let timer: NodeJS.Timeout | undefined;
    const timeout = new Promise<never>((_resolve, reject) => {
      timer = setTimeout(
        () => reject(new Error(`no answer within ${COMMAND_TIMEOUT_MS} ms`)),
        COMMAND_TIMEOUT_MS,
      );
    });
    try {
      return await Promise.race([run(), timeout]);
    } catch (err) {
      throw new SharedStateUnavailableError(err);
    } finally {
      clearTimeout(timer);
    }
  }

  override increment(key: string): Promise<IncrementResponse> {
    return this.guarded(() => super.increment(key));
  }

  override async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const info = await this.guarded(() => super.get(key));
    // A key that does not exist comes back as (nil, -2): no hits.
    if (info === undefined || !Number.isFinite(info.totalHits) || info.totalHits <= 0) return undefined;
    return info;
  }

  override decrement(key: string): Promise<void> {
    return this.guarded(() => super.decrement(key));
  }

  override resetKey(key: string): Promise<void> {
    return this.guarded(() => super.resetKey(key));
  }
}

/** A rate-limit store that counts in Redis; `windowMs` is set by express-rate-limit, or by `init`. */
export type SharedRateLimitStore = ResilientRedisStore;

export interface SharedState {
  /** A store for one limiter, its keys under `ebullio:rl:<limiter>:`. */
  rateLimitStore(limiter: string): SharedRateLimitStore;
  /** Tells the other nodes that authentication data changed (sent on the next turn, once per turn). */
  publishAuthChange(): void;
  /** Called when another node says authentication data changed, and after the subscriber reconnects. */
  onAuthChange(listener: () => void): void;
  /** Resolves true once both connections are ready, false if not within `timeoutMs`. */
  ready(timeoutMs: number): Promise<boolean>;
  /** Closes both connections (pending commands are answered first). Idempotent. */
  close(): Promise<void>;
  /** Messages received from other nodes (diagnostics and tests). */
  readonly invalidationsReceived: number;
}

/** Reconnect after 100 ms, doubling up to 2 s, for ever (the limiters answer 503 meanwhile). */
function reconnectDelay(retries: number): number {
  return Math.min(100 * 2 ** Math.min(retries, 5), 2_000);
}

/** Logs a connection error at most once per 10 s, so an outage does not flood the log. */
function throttledLog(what: string): (err: Error) => void {
  let last = 0;
  return (err) => {
    const now = Date.now();
    if (now - last < 10_000) return;
    last = now;
    console.error(`[shared-state] ${what}: ${err.message}`);
  };
}

/** Opens the two Redis connections (commands, and the subscriber) of `url`; connecting goes on in the background. */
export function connectSharedState(url: string): SharedState {
  const node = crypto.randomBytes(8).toString('hex');
  const client = createClient({
    url,
    name: 'ebullio',
    disableOfflineQueue: true,
    commandOptions: { timeout: COMMAND_TIMEOUT_MS },
    socket: { connectTimeout: 2_000, reconnectStrategy: reconnectDelay },
  });
  const subscriber = client.duplicate({ name: 'ebullio-subscriber' });
  client.on('error', throttledLog('command connection'));
  subscriber.on('error', throttledLog('subscriber connection'));

  const listeners: (() => void)[] = [];
  let received = 0;
  let publishQueued = false;
  let closed = false;
  const notify = () => {
    for (const listener of listeners) listener();
  };
  // After a reconnection, messages sent while it was down are lost: forget everything once.
  let subscribedOnce = false;
  subscriber.on('ready', () => {
    if (subscribedOnce) notify();
  });

  const connecting = Promise.all([
    client.connect(),
    subscriber.connect().then(() =>
      subscriber.subscribe(AUTH_CHANGED_CHANNEL, (message) => {
        if (message === node) return; // our own: the local triggers already cleared our cache
        received++;
        notify();
      }),
    ),
  ]).then(() => {
    subscribedOnce = true;
  });
  connecting.catch((err: unknown) => {
    if (!closed) console.error(`[shared-state] cannot connect to Redis: ${(err as Error).message}`);
  });

  return {
    rateLimitStore(limiter) {
      return new ResilientRedisStore({
        prefix: `${KEY_PREFIX}rl:${limiter}:`,
        sendCommand: (...args: string[]) => client.sendCommand(args) as Promise<RedisReply>,
      });
    },
    publishAuthChange() {
      if (publishQueued || closed) return;
      publishQueued = true;
      // On the next turn: the change is committed by then (the writes are synchronous), so no
      // node can re-read the old row after the message.
      setImmediate(() => {
        publishQueued = false;
        if (closed) return;
        client.publish(AUTH_CHANGED_CHANNEL, node).catch((err: unknown) => {
          // The other nodes still see the change through auth_revision.
          console.error(`[shared-state] key-cache invalidation not published: ${(err as Error).message}`);
        });
      });
    },
    onAuthChange(listener) {
      listeners.push(listener);
    },
    async ready(timeoutMs) {
      let timer: NodeJS.Timeout | undefined;
      const timeout = new Promise<boolean>((resolve) => {
        timer = setTimeout(() => resolve(false), timeoutMs);
      });
      const done = connecting.then(
        () => true,
        () => false,
      );
      try {
        return await Promise.race([done, timeout]);
      } finally {
        clearTimeout(timer);
      }
    },
    async close() {
      if (closed) return;
      closed = true;
      // A ready connection answers its pending commands first; one still (re)connecting is dropped.
      await Promise.allSettled(
        [client, subscriber].map(async (c) => {
          if (!c.isOpen) return;
          if (c.isReady) await c.close();
          else c.destroy();
        }),
      );
    },
    get invalidationsReceived() {
      return received;
    },
  };
}
