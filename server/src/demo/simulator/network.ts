import type { Rng } from './prng';

/**
 * The demo's invented address plan. Only the blocks reserved for
 * documentation are used (RFC 5737 for IPv4, RFC 3849 for IPv6), so no real
 * host's address can ever appear in demo data. Since those blocks carry no
 * geography, the demo assigns them one:
 *
 *   198.51.100.0/24, 2001:db8:1::/48  domestic residential and mobile networks
 *   192.0.2.0/24                      domestic hosting and proxy networks
 *   203.0.113.0/24, 2001:db8:f::/48   networks abroad
 */
export type IpRegion = 'domestic' | 'foreign';

const hex16 = (rng: Rng) => rng.int(1, 0xffff).toString(16);

/** An address on a domestic residential or mobile network. */
export function residentialIp(rng: Rng): string {
  return rng.chance(0.5) ? `198.51.100.${rng.int(1, 254)}` : `2001:db8:1:${hex16(rng)}::${hex16(rng)}`;
}

/** An address on a domestic hosting or proxy network. */
export function proxyIp(rng: Rng): string {
  return `192.0.2.${rng.int(1, 254)}`;
}

/** An address on a network abroad. */
export function foreignIp(rng: Rng): string {
  return rng.chance(0.6) ? `203.0.113.${rng.int(1, 254)}` : `2001:db8:f:${hex16(rng)}::${hex16(rng)}`;
}

/** Which side of the demo's plan an address sits on. */
export function ipRegion(ip: string): IpRegion {
  return ip.startsWith('203.0.113.') || ip.startsWith('2001:db8:f:') ? 'foreign' : 'domestic';
}
