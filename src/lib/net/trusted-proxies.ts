import { BlockList, isIPv4, isIPv6 } from 'node:net';

/**
 * Which peers may tell us who the client is (TRUST_PROXY), and the rule that finds the client
 * behind them. Pure: no Astro, no database. The server (scripts/serve.ts) applies it to the
 * socket before any route runs; the environment schema (src/config.ts) validates with it.
 */

/** A TRUST_PROXY value that cannot be read. Its message names the offending entry. */
export class TrustProxyError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'TrustProxyError';
  }
}

export interface TrustedProxies {
  /** The entries as configured, after `1` was expanded to loopback (for logs). */
  readonly entries: readonly string[];
  /** True when the address (any spelling: IPv4-mapped, bracketed, with a zone) is a trusted proxy. */
  has(address: string): boolean;
}

/** What `TRUST_PROXY=1` has always meant: a proxy on this machine. */
export const LOOPBACK_ENTRIES = ['127.0.0.0/8', '::1'] as const;

const MAPPED_V4 = /^::ffff:([0-9a-f]{1,4}):([0-9a-f]{1,4})$/;

/**
 * One canonical spelling of an IP address, or null when the text is not one.
 * IPv4-mapped IPv6 (`::ffff:1.2.3.4`, as a dual-stack socket reports IPv4 peers) becomes
 * IPv4; IPv6 is lower-cased and compressed; a zone (`%eth0`), brackets and a port
 * (`1.2.3.4:5678`, `[::1]:80`, as some proxies write them) are removed.
 */
export function normaliseAddress(raw: string): string | null {
  let text = raw.trim();
  if (text.length === 0 || text.length > 100) return null;
  const bracketed = /^\[([^\]]+)\](?::\d{1,5})?$/.exec(text);
  if (bracketed) text = bracketed[1]!;
  else {
    const v4WithPort = /^(\d{1,3}(?:\.\d{1,3}){3}):\d{1,5}$/.exec(text);
    if (v4WithPort) text = v4WithPort[1]!;
  }
  const zone = text.indexOf('%');
  if (zone > 0 && text.includes(':')) text = text.slice(0, zone);
  if (isIPv4(text)) return text;
  if (!isIPv6(text)) return null;
  // The WHATWG URL parser writes IPv6 in its canonical (RFC 5952) form.
  const canonical = new URL(`http://[${text}]/`).hostname.slice(1, -1);
  const mapped = MAPPED_V4.exec(canonical);
  if (mapped) {
    const hi = parseInt(mapped[1]!, 16);
    const lo = parseInt(mapped[2]!, 16);
    return `${hi >> 8}.${hi & 255}.${lo >> 8}.${lo & 255}`;
  }
  return canonical;
}

function addEntry(list: BlockList, entry: string): void {
  const slash = entry.indexOf('/');
  const addressText = slash === -1 ? entry : entry.slice(0, slash);
  // A bare address only: brackets, a port or a zone in the configuration is a mistake worth naming.
  if ((!isIPv4(addressText) && !isIPv6(addressText)) || addressText.includes('%')) {
    throw new TrustProxyError(
      `TRUST_PROXY: "${entry}" is not an IP address or CIDR range (e.g. 10.0.0.5, 10.0.0.0/8, fd00::/8); separate entries with commas.`,
    );
  }
  const address = normaliseAddress(addressText)!;
  const family = isIPv4(address) ? 'ipv4' : 'ipv6';
  if (slash === -1) {
    list.addAddress(address, family);
    return;
  }
  const prefixText = entry.slice(slash + 1);
  if (!/^\d{1,3}$/.test(prefixText)) throw new TrustProxyError(`TRUST_PROXY: "${entry}" has no valid prefix length after "/".`);
  let prefix = Number(prefixText);
  // ::ffff:10.0.0.0/104 is 10.0.0.0/8 written as IPv6; it is matched as IPv4 like every mapped address.
  const mappedRange = family === 'ipv4' && isIPv6(addressText);
  if (mappedRange) {
    if (prefix < 96 || prefix > 128) throw new TrustProxyError(`TRUST_PROXY: "${entry}": an IPv4-mapped range needs a prefix between 96 and 128.`);
    prefix -= 96;
  }
  const max = family === 'ipv4' ? 32 : 128;
  if (prefix > max) throw new TrustProxyError(`TRUST_PROXY: "${entry}": the prefix length must be at most ${max}.`);
  list.addSubnet(address, prefix, family);
}

/**
 * Reads TRUST_PROXY: empty or unset trusts no proxy (every X-Forwarded-* header is dropped);
 * `1` trusts loopback only (127.0.0.0/8 and ::1), as before; otherwise a comma-separated list
 * of IPv4/IPv6 addresses and CIDR ranges. Anything else throws TrustProxyError.
 */
export function parseTrustProxy(value: string | undefined | null): TrustedProxies {
  const text = (value ?? '').trim();
  const pieces =
    text === ''
      ? []
      : text === '1'
        ? [...LOOPBACK_ENTRIES]
        : text
            .split(',')
            .map((p) => p.trim())
            .filter((p) => p !== '');
  const list = new BlockList();
  for (const piece of pieces) addEntry(list, piece);
  const entries = Object.freeze(pieces);
  return {
    entries,
    has(address: string): boolean {
      if (entries.length === 0) return false;
      const normal = normaliseAddress(address);
      if (!normal) return false;
      return list.check(normal, isIPv4(normal) ? 'ipv4' : 'ipv6');
    },
  };
}

/** Splits X-Forwarded-For (one header or several) into its hops, left (farthest) to right (nearest). */
export function forwardedHops(header: string | readonly string[] | undefined | null): string[] {
  if (header == null) return [];
  const joined = typeof header === 'string' ? header : header.join(',');
  return joined
    .split(',')
    .map((h) => h.trim())
    .filter((h) => h !== '');
}

/**
 * The client's address. A peer that is not a trusted proxy IS the client, whatever it wrote
 * in X-Forwarded-For. Behind trusted proxies, the client is the right-most X-Forwarded-For
 * address that is not itself a trusted proxy: every hop to its right was appended by a proxy
 * we trust, everything to its left was written by the client and proves nothing. When every
 * hop is trusted, the left-most is the best we know. A malformed hop stops the walk at the
 * last trusted address before it (fails closed: it cannot name an arbitrary client).
 */
export function clientAddressFrom(peer: string, forwardedFor: string | readonly string[] | undefined | null, trusted: TrustedProxies): string {
  const peerAddress = normaliseAddress(peer) ?? peer;
  if (!trusted.has(peerAddress)) return peerAddress;
  let nearest = peerAddress;
  const hops = forwardedHops(forwardedFor);
  for (let i = hops.length - 1; i >= 0; i--) {
    const hop = normaliseAddress(hops[i]!);
    if (hop === null) return nearest;
    if (!trusted.has(hop)) return hop;
    nearest = hop;
  }
  return nearest;
}
