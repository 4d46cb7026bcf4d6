import { RateLimiterDrizzle, RateLimiterRes } from "rate-limiter-flexible";
import { rateLimits } from "~/db/schema";
import { db } from "./db.server";

/**
 * Throttles for password guesses (sign-in and the account page's current-password check) and
 * for reset mails, counted in PostgreSQL by rate-limiter-flexible's Drizzle store (table
 * rate_limits, docs/decisions/009). Every limit is keyed so that whoever guesses wrong slows
 * themself: the pair (account, client) locks, the client across accounts locks, and the
 * account across all clients only slows, so a stranger can never lock the owner out.
 */

/** At most `max` within `windowSec`; reaching it locks the key for `lockSec`. */
type Limit = { max: number; windowSec: number; lockSec: number };

export const PASSWORD_LIMITS = {
  /** One account from one client: the owner mistyping, or someone guessing at one account. */
  pair: { max: 5, windowSec: 15 * 60, lockSec: 15 * 60 },
  /** One client across accounts: trying one password on many accounts (spraying). */
  client: { max: 10, windowSec: 15 * 60, lockSec: 15 * 60 },
  /**
   * One account from every client: guessing spread over many addresses. Past the ceiling the
   * account is slowed to one try per `paceSec`, never locked.
   */
  account: { max: 50, windowSec: 60 * 60, paceSec: 30 },
} as const;

export const RESET_LIMITS = {
  /** Reset mails to one address. */
  account: { max: 3, windowSec: 60 * 60 },
  /** Reset requests from one client, whatever the address. */
  client: { max: 10, windowSec: 60 * 60 },
} as const;

/** Which limit refused, and after how many seconds the same request may be tried again. */
export type Refusal = { scope: "pair" | "client" | "account"; retryAfterSec: number };

type Count = { count: number; retryAfterSec: number };

let cleanupStarted = false;

/** One named counter in rate_limits (its keys are prefixed with the name). */
class Counter {
  #limiter: RateLimiterDrizzle | undefined;
  constructor(
    private readonly name: string,
    private readonly max: number,
    private readonly windowSec: number,
  ) {}

  private get limiter() {
    this.#limiter ??= new RateLimiterDrizzle({
      storeClient: db(),
      schema: rateLimits,
      keyPrefix: this.name,
      points: this.max,
      duration: this.windowSec,
      // The library's clean-up deletes expired rows of the whole table: one timer is enough.
      clearExpiredByTimeout: !cleanupStarted,
    });
    cleanupStarted = true;
    return this.#limiter;
  }

  /** Counts one, atomically: parallel requests each see their own count. */
  async add(key: string): Promise<Count> {
    return toCount(await this.limiter.penalty(key, 1));
  }

  async peek(key: string): Promise<Count> {
    const res = await this.limiter.get(key);
    return res ? toCount(res) : { count: 0, retryAfterSec: 0 };
  }

  async giveBack(key: string): Promise<void> {
    await this.limiter.reward(key, 1);
  }

  async clear(key: string): Promise<void> {
    await this.limiter.delete(key);
  }

  /** Takes the key's one slot of the window; false when it is taken (and how long for). */
  async takeSlot(key: string): Promise<{ ok: true } | { ok: false; retryAfterSec: number }> {
    try {
      await this.limiter.consume(key, 1);
      return { ok: true };
    } catch (err) {
      if (err instanceof RateLimiterRes) return { ok: false, retryAfterSec: seconds(err.msBeforeNext) };
      throw err;
    }
  }
}

function toCount(res: RateLimiterRes): Count {
  return { count: res.consumedPoints, retryAfterSec: seconds(res.msBeforeNext) };
}

const seconds = (ms: number) => Math.max(1, Math.ceil(ms / 1000));

/**
 * Locks are rows of their own, apart from the counts: a count goes down when an attempt is
 * given back (it succeeded, or a parallel one took the last place), which must never shorten
 * a lock that has started.
 */
class Lock {
  readonly #slot: Counter;
  constructor(name: string, seconds: number) {
    this.#slot = new Counter(name, 1, seconds);
  }
  async start(key: string): Promise<void> {
    await this.#slot.add(key);
  }
  /** Seconds until the lock ends, or 0 when there is none. */
  async remaining(key: string): Promise<number> {
    const c = await this.#slot.peek(key);
    return c.count > 0 ? c.retryAfterSec : 0;
  }
}

const guesses = {
  pair: new Counter("pw-pair", PASSWORD_LIMITS.pair.max, PASSWORD_LIMITS.pair.windowSec),
  pairLock: new Lock("pw-pair-lock", PASSWORD_LIMITS.pair.lockSec),
  client: new Counter("pw-client", PASSWORD_LIMITS.client.max, PASSWORD_LIMITS.client.windowSec),
  clientLock: new Lock("pw-client-lock", PASSWORD_LIMITS.client.lockSec),
  account: new Counter("pw-account", PASSWORD_LIMITS.account.max, PASSWORD_LIMITS.account.windowSec),
  pace: new Counter("pw-pace", 1, PASSWORD_LIMITS.account.paceSec),
};

const resets = {
  account: new Counter("reset-account", RESET_LIMITS.account.max, RESET_LIMITS.account.windowSec),
  client: new Counter("reset-client", RESET_LIMITS.client.max, RESET_LIMITS.client.windowSec),
};

/** Accounts are e-mail addresses, compared as the sign-in form compares them. */
export const accountKey = (email: string) => email.trim().toLowerCase();
const pairKey = (account: string, client: string) => `${account}|${client}`;

function reached(c: Count, limit: Pick<Limit, "max">) {
  return c.count >= limit.max;
}

/**
 * One password check under the throttles. `check` runs only when no limit refuses; its
 * attempt is counted before it runs (so that parallel guesses cannot all slip under a limit)
 * and given back when it succeeds. A success also ends the pair's count.
 */
export async function throttledPasswordCheck(
  email: string,
  client: string,
  check: () => Promise<boolean>,
): Promise<{ ok: boolean } | { refused: Refusal }> {
  const account = accountKey(email);
  const pair = pairKey(account, client);
  const L = PASSWORD_LIMITS;

  // Locked: refused without counting.
  const [pairLocked, clientLocked] = await Promise.all([guesses.pairLock.remaining(pair), guesses.clientLock.remaining(client)]);
  if (pairLocked) return { refused: { scope: "pair", retryAfterSec: pairLocked } };
  if (clientLocked) return { refused: { scope: "client", retryAfterSec: clientLocked } };

  const [p, c, a] = await Promise.all([guesses.pair.add(pair), guesses.client.add(client), guesses.account.add(account)]);
  const giveBackAll = () => Promise.all([guesses.pair.giveBack(pair), guesses.client.giveBack(client), guesses.account.giveBack(account)]);
  // Past the limit (a parallel attempt took the last place): not a guess, so not counted.
  let refused: Refusal | null = null;
  if (p.count > L.pair.max) refused = { scope: "pair", retryAfterSec: p.retryAfterSec };
  else if (c.count > L.client.max) refused = { scope: "client", retryAfterSec: c.retryAfterSec };
  else if (a.count > L.account.max) {
    const slot = await guesses.pace.takeSlot(account);
    if (!slot.ok) refused = { scope: "account", retryAfterSec: slot.retryAfterSec };
  }
  if (refused) {
    await giveBackAll();
    return { refused };
  }

  if (await check()) {
    await Promise.all([guesses.pair.clear(pair), guesses.client.giveBack(client), guesses.account.giveBack(account)]);
    return { ok: true };
  }
  // The failure that reaches a limit starts a full lock from now.
  await Promise.all([
    reached(p, L.pair) ? guesses.pairLock.start(pair) : null,
    reached(c, L.client) ? guesses.clientLock.start(client) : null,
  ]);
  return { ok: false };
}

/** Counts one reset request; a refusal means no mail may go out for it. */
export async function throttleResetRequest(email: string, client: string): Promise<Refusal | null> {
  const byClient = await resets.client.add(client);
  if (byClient.count > RESET_LIMITS.client.max) return { scope: "client", retryAfterSec: byClient.retryAfterSec };
  const byAccount = await resets.account.add(accountKey(email));
  if (byAccount.count > RESET_LIMITS.account.max) return { scope: "account", retryAfterSec: byAccount.retryAfterSec };
  return null;
}

/** "3 minutes", "30 seconds": how long to wait, rounded up, for the refusal messages. */
export function waitText(seconds: number): string {
  if (seconds < 90) return `${seconds} second${seconds === 1 ? "" : "s"}`;
  const m = Math.ceil(seconds / 60);
  return `${m} minute${m === 1 ? "" : "s"}`;
}

/** What the sign-in form and the account page say when a password check is refused. */
export function passwordRefusalMessage(r: Refusal): string {
  const wait = `Try again in ${waitText(r.retryAfterSec)}.`;
  if (r.scope === "pair") return `Too many wrong passwords for this account from this computer. ${wait}`;
  if (r.scope === "client") return `Too many wrong passwords from this computer. ${wait}`;
  return `This account has had many wrong passwords from elsewhere, so it takes one try every ${PASSWORD_LIMITS.account.paceSec} seconds. ${wait}`;
}

/** What the reset form says when no more mails may go out. */
export function resetRefusalMessage(r: Refusal): string {
  const wait = `Try again in ${waitText(r.retryAfterSec)}.`;
  if (r.scope === "client") return `Too many reset requests from this computer. ${wait}`;
  return `Enough reset links have been asked for this address for now; if it has an account, use the latest link sent to it. ${wait}`;
}

/**
 * A route's `headers` export for a form a throttle may refuse: the parent's headers, plus the
 * action's Retry-After (RFC 9110 §10.2.3), which React Router does not pass to the page itself.
 */
export function withRetryAfter({ parentHeaders, actionHeaders }: { parentHeaders: Headers; actionHeaders: Headers }): Headers {
  const headers = new Headers(parentHeaders);
  const retryAfter = actionHeaders.get("Retry-After");
  if (retryAfter) headers.set("Retry-After", retryAfter);
  return headers;
}
