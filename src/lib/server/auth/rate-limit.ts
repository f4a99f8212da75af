/**
 * Sign-in and sign-up throttling with rate-limiter-flexible's MySQL store over the app's knex pool,
 * so every app process (on any machine) shares one count. Only failures count for sign-in: a person
 * who types the password right is never slowed down, a guesser is stopped per account and per address.
 */
import { RateLimiterMySQL, RateLimiterRes } from 'rate-limiter-flexible';
import { db } from '../db.ts';
import { readDbSettings } from '../db-config.ts';
import { serverEnv } from '../env.ts';
import { tooManyRequests } from '../http.ts';

type Limiters = { account: RateLimiterMySQL; address: RateLimiterMySQL; signUp: RateLimiterMySQL };
let limiters: Limiters | undefined;

function make(keyPrefix: string, points: number, duration: number): RateLimiterMySQL {
  return new RateLimiterMySQL({
    storeClient: db,
    storeType: 'knex',
    dbName: readDbSettings().database,
    tableName: 'rate_limits',
    tableCreated: true, // migrations/20261201000600_create_rate_limits.ts
    keyPrefix,
    points,
    duration,
    blockDuration: duration,
    clearExpiredByTimeout: false,
  });
}

function get(): Limiters {
  if (!limiters) {
    const { accountFailures, addressFailures, signUpsPerAddress, windowSeconds } = serverEnv().rateLimit;
    limiters = {
      account: make('signin_account', accountFailures, windowSeconds),
      address: make('signin_address', addressFailures, windowSeconds),
      signUp: make('signup_address', signUpsPerAddress, windowSeconds * 4),
    };
  }
  return limiters;
}

async function remaining(limiter: RateLimiterMySQL, key: string): Promise<number | null> {
  const res = await limiter.get(key);
  if (res && res.consumedPoints >= limiter.points) return res.msBeforeNext / 1000;
  return null;
}

function minutes(seconds: number): string {
  const m = Math.max(1, Math.ceil(seconds / 60));
  return m === 1 ? '1 minute' : `${m} minutes`;
}

/** Throws 429 when this account or this address has used up its failed attempts. */
export async function assertSignInAllowed(email: string, address: string): Promise<void> {
  const l = get();
  const accountWait = await remaining(l.account, email);
  if (accountWait !== null) {
    throw tooManyRequests(`Too many failed sign-ins for this account. Try again in ${minutes(accountWait)}.`, accountWait);
  }
  const addressWait = await remaining(l.address, address);
  if (addressWait !== null) {
    throw tooManyRequests(`Too many failed sign-ins from your network address. Try again in ${minutes(addressWait)}.`, addressWait);
  }
}

async function consume(limiter: RateLimiterMySQL, key: string): Promise<void> {
  try {
    await limiter.consume(key);
  } catch (err) {
    if (!(err instanceof RateLimiterRes)) throw err;
  }
}

export async function recordSignInFailure(email: string, address: string): Promise<void> {
  const l = get();
  await Promise.all([consume(l.account, email), consume(l.address, address)]);
}

export async function recordSignInSuccess(email: string): Promise<void> {
  await get().account.delete(email);
}

/** Counts one sign-up from this address; throws 429 past the limit. */
export async function consumeSignUp(address: string): Promise<void> {
  try {
    await get().signUp.consume(address);
  } catch (err) {
    if (err instanceof RateLimiterRes) {
      throw tooManyRequests(`Too many new accounts from your network address. Try again in ${minutes(err.msBeforeNext / 1000)}.`, err.msBeforeNext / 1000);
    }
    throw err;
  }
}
