/**
 * Per-request facts that code far from the request needs (the Auth.js callbacks, the sign-in
 * check): the caller's address. Set by the middleware for the length of one request.
 */
import { AsyncLocalStorage } from 'node:async_hooks';

export interface RequestFacts {
  address: string | null;
}
const storage = new AsyncLocalStorage<RequestFacts>();

export function runWithRequestFacts<T>(facts: RequestFacts, fn: () => T): T {
  return storage.run(facts, fn);
}

export function requestAddress(): string | null {
  return storage.getStore()?.address ?? null;
}

/**
 * The caller's address: the socket's peer, or — only when EBB_TRUST_PROXY=1, behind a load balancer
 * that sets it — the last hop of X-Forwarded-For (the one the balancer added, not the client's claim).
 */
export function clientAddress(headers: Headers, socketAddress: string | null, env = process.env): string | null {
  if (env.EBB_TRUST_PROXY === '1') {
    const hops = (headers.get('x-forwarded-for') ?? '')
      .split(',')
      .map((h) => h.trim())
      .filter(Boolean);
    if (hops.length) return hops[hops.length - 1].slice(0, 64);
  }
  return socketAddress;
}
