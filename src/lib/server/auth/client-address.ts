import { serverEnv } from '../env.ts';

/** The client's address: the socket peer, or the first X-Forwarded-For hop when TRUST_PROXY is on. */
export function clientAddress(request: Request, socketAddress: string | undefined): string {
  if (serverEnv().trustProxy) {
    const forwarded = request.headers.get('x-forwarded-for');
    const first = forwarded?.split(',')[0]?.trim();
    if (first) return first.slice(0, 64);
  }
  return (socketAddress ?? 'unknown').slice(0, 64);
}
