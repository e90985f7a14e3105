import { isIP } from 'node:net';

/**
 * The source a request is counted against for throttling and queue shares: its peer address
 * (never a forwarded-for header, which any client can write). An IPv4 address mapped into IPv6
 * is the IPv4 address; an IPv6 address counts as its /64, the block one host usually holds,
 * so stepping through the addresses of one block does not make a new source each time.
 */
export function sourceOf(address: string | undefined): string {
  if (!address) return 'unknown';
  const mapped = /^::ffff:(\d+\.\d+\.\d+\.\d+)$/i.exec(address);
  if (mapped) return mapped[1];
  if (isIP(address) !== 6) return address;
  const groups = expandIpv6(address);
  return `${groups.slice(0, 4).join(':')}::/64`;
}

/** The eight groups of an IPv6 address, "::" expanded (a zone index dropped). */
function expandIpv6(address: string): string[] {
  const [head, tail] = address.split('%')[0].toLowerCase().split('::');
  const left = head ? head.split(':') : [];
  const right = tail !== undefined && tail !== '' ? tail.split(':') : [];
  const missing = tail === undefined ? 0 : 8 - left.length - right.length;
  return [...left, ...Array<string>(missing).fill('0'), ...right].map((g) => g.replace(/^0+(?=.)/, ''));
}
