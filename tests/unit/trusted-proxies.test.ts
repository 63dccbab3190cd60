import { describe, it, expect } from 'vitest';
import { parseTrustProxy, clientAddressFrom, normaliseAddress, forwardedHops, TrustProxyError } from '../../src/lib/net';
import { expectedOrigins, isSameOrigin, cookiesMustBeSecure } from '../../src/server/request';

// Addresses are from the documentation ranges (RFC 5737: 192.0.2.0/24, 198.51.100.0/24,
// 203.0.113.0/24; RFC 3849: 2001:db8::/32) and private ranges (RFC 1918, RFC 4193 fd00::/8).

describe('normaliseAddress', () => {
  it.each([
    ['IPv4 as is', '203.0.113.7', '203.0.113.7'],
    ['surrounding spaces go', '  203.0.113.7 ', '203.0.113.7'],
    ['IPv4-mapped IPv6 is IPv4 (RFC 4291 §2.5.5.2)', '::ffff:203.0.113.7', '203.0.113.7'],
    ['IPv4-mapped IPv6 in hex groups is IPv4', '::ffff:cb00:7107', '203.0.113.7'],
    ['IPv6 is lower-cased and compressed (RFC 5952 §4)', '2001:0DB8:0000:0000:0000:0000:0000:0001', '2001:db8::1'],
    ['loopback IPv6 spelled out', '0:0:0:0:0:0:0:1', '::1'],
    ['an IPv4 port is dropped', '203.0.113.7:51234', '203.0.113.7'],
    ['a bracketed IPv6 with port', '[2001:db8::1]:443', '2001:db8::1'],
    ['a bracketed IPv6 without port', '[2001:db8::1]', '2001:db8::1'],
    ['a zone is dropped', 'fe80::1%eth0', 'fe80::1'],
    ['a name is not an address', 'proxy.example', null],
    ['"unknown" (RFC 7239 obfuscated node) is not an address', 'unknown', null],
    ['leading zeros are refused (ambiguous octal)', '010.0.0.1', null],
    ['an octet over 255', '203.0.113.256', null],
    ['SQL is not an address', "'; DROP TABLE x; --", null],
    ['empty', '', null],
  ])('%s: %s -> %s', (_case, input, expected) => {
    expect(normaliseAddress(input)).toBe(expected);
  });
});

describe('parseTrustProxy: what is trusted', () => {
  it.each([
    // [TRUST_PROXY, address, trusted?]
    ['', '127.0.0.1', false],
    [undefined, '127.0.0.1', false],
    ['1', '127.0.0.1', true],
    ['1', '127.10.20.30', true],
    ['1', '::1', true],
    ['1', '::ffff:127.0.0.1', true],
    ['1', '10.0.0.1', false],
    ['1', '2001:db8::1', false],
    ['10.0.0.5', '10.0.0.5', true],
    ['10.0.0.5', '10.0.0.6', false],
    ['10.0.0.5', '::ffff:10.0.0.5', true],
    ['10.0.0.0/8', '10.255.255.255', true],
    ['10.0.0.0/8', '11.0.0.0', false],
    ['192.0.2.0/25', '192.0.2.127', true],
    ['192.0.2.0/25', '192.0.2.128', false],
    ['192.0.2.10/32', '192.0.2.10', true],
    ['0.0.0.0/0', '203.0.113.9', true],
    [' 10.0.0.5 , 2001:db8::/32 ', '2001:db8:ffff::1', true],
    ['10.0.0.5,2001:db8::/32', '2001:db9::1', false],
    ['fd00::/8', 'fd12:3456::1', true],
    ['fd00::/8', 'fe80::1', false],
    ['2001:db8::1', '2001:DB8:0:0:0:0:0:1', true],
    ['::ffff:10.0.0.0/104', '10.1.2.3', true],
    ['::ffff:10.0.0.0/104', '11.1.2.3', false],
    ['10.0.0.0/8', 'not-an-ip', false],
    ['10.0.0.0/8,', '10.0.0.1', true],
  ])('TRUST_PROXY=%j trusts %s: %s', (value, address, expected) => {
    expect(parseTrustProxy(value).has(address)).toBe(expected);
  });

  it('expands 1 to loopback for the logs', () => {
    expect(parseTrustProxy('1').entries).toEqual(['127.0.0.0/8', '::1']);
    expect(parseTrustProxy('').entries).toEqual([]);
  });
});

describe('parseTrustProxy: a value that cannot be read stops the start', () => {
  it.each([
    ['a host name', 'proxy.example', /"proxy\.example" is not an IP address or CIDR/],
    ['true is not 1', 'true', /"true" is not an IP address/],
    ['0 is not "none"', '0', /"0" is not an IP address/],
    ['1 inside a list', '1,10.0.0.1', /"1" is not an IP address/],
    ['an IPv4 prefix over 32', '10.0.0.0/33', /at most 32/],
    ['an IPv6 prefix over 128', '2001:db8::/129', /at most 128/],
    ['a prefix that is not a number', '10.0.0.0/x', /no valid prefix length/],
    ['an empty prefix', '10.0.0.0/', /no valid prefix length/],
    ['a port', '10.0.0.1:8080', /not an IP address/],
    ['brackets', '[::1]', /not an IP address/],
    ['a zone', 'fe80::1%eth0', /zone|not an IP address/],
    ['a mapped range shorter than /96', '::ffff:10.0.0.0/64', /between 96 and 128/],
    ['spaces instead of commas', '10.0.0.1 10.0.0.2', /not an IP address/],
  ])('%s (%s)', (_case, value, message) => {
    expect(() => parseTrustProxy(value)).toThrow(TrustProxyError);
    expect(() => parseTrustProxy(value)).toThrow(message);
  });
});

describe('forwardedHops', () => {
  it.each([
    [undefined, []],
    ['', []],
    ['203.0.113.7', ['203.0.113.7']],
    ['203.0.113.7, 10.0.0.2 ,10.0.0.3', ['203.0.113.7', '10.0.0.2', '10.0.0.3']],
    [
      ['203.0.113.7, 10.0.0.2', '10.0.0.3'],
      ['203.0.113.7', '10.0.0.2', '10.0.0.3'],
    ],
    ['a,,b', ['a', 'b']],
  ])('%j -> %j', (header, expected) => {
    expect(forwardedHops(header as string | string[] | undefined)).toEqual(expected);
  });
});

// The right-most address that is not a trusted proxy is the client: each trusted proxy appends
// the address it saw, so everything to the right of that entry was written by proxies we trust
// and everything to its left by whoever the client is (MDN, "X-Forwarded-For", section
// "Selecting an IP address": "the rightmost IP address that is not a trusted proxy").
describe('clientAddressFrom: the right-most untrusted rule', () => {
  it.each([
    // [case, TRUST_PROXY, socket peer, X-Forwarded-For, client]
    ['no proxy trusted: the peer, whatever it forwards', '', '198.51.100.20', '203.0.113.7', '198.51.100.20'],
    ['no proxy trusted: a rotating header changes nothing', '', '127.0.0.1', '192.0.2.99, 203.0.113.1', '127.0.0.1'],
    ['an untrusted peer on a trusting server is still the client', '10.0.0.0/8', '198.51.100.20', '203.0.113.7', '198.51.100.20'],
    ['one trusted proxy: the address it appended', '10.0.0.5', '10.0.0.5', '203.0.113.7', '203.0.113.7'],
    ['a client-written prefix is ignored', '10.0.0.5', '10.0.0.5', '192.0.2.1, 192.0.2.2, 203.0.113.7', '203.0.113.7'],
    ['two trusted proxies: skip both', '10.0.0.0/8', '10.0.0.5', '192.0.2.1, 203.0.113.7, 10.0.0.9', '203.0.113.7'],
    ['a trusted peer without the header: the peer', '10.0.0.5', '10.0.0.5', undefined, '10.0.0.5'],
    ['every hop trusted: the left-most', '10.0.0.0/8', '10.0.0.5', '10.1.1.1, 10.2.2.2', '10.1.1.1'],
    ['legacy 1: loopback proxy in front', '1', '127.0.0.1', '203.0.113.7', '203.0.113.7'],
    ['legacy 1: a dual-stack socket reports the proxy IPv4-mapped', '1', '::ffff:127.0.0.1', '203.0.113.7', '203.0.113.7'],
    ['legacy 1: IPv6 loopback proxy, IPv6 client', '1', '::1', '2001:DB8::7', '2001:db8::7'],
    ['a mapped client address is given as IPv4', '1', '127.0.0.1', '::ffff:203.0.113.7', '203.0.113.7'],
    ['a port on the hop is dropped', '1', '127.0.0.1', '203.0.113.7:40000', '203.0.113.7'],
    ['a malformed nearest hop: fail closed to the proxy', '10.0.0.5', '10.0.0.5', '203.0.113.7, not-an-ip', '10.0.0.5'],
    ['a malformed hop further left is never reached', '10.0.0.5', '10.0.0.5', 'garbage, 203.0.113.7', '203.0.113.7'],
    ['a malformed hop behind two trusted: the nearer trusted hop', '10.0.0.0/8', '10.0.0.5', '203.0.113.7, unknown, 10.0.0.9', '10.0.0.9'],
    ['the untrusted peer is normalised too', '', '::ffff:198.51.100.20', undefined, '198.51.100.20'],
  ])('%s', (_case, trustProxy, peer, xff, expected) => {
    expect(clientAddressFrom(peer, xff, parseTrustProxy(trustProxy))).toBe(expected);
  });

  it('reads the header when Node hands it over as several values', () => {
    expect(clientAddressFrom('10.0.0.5', ['192.0.2.1', '203.0.113.7'], parseTrustProxy('10.0.0.5'))).toBe('203.0.113.7');
  });
});

// The other two decisions TRUST_PROXY used to sway now rest on PUBLIC_URL alone: no forwarded
// header is read (the Fetch standard's origin serialisation: scheme://host[:non-default port]).
describe('expectedOrigins and isSameOrigin (CSRF)', () => {
  const request = (headers: Record<string, string>) => new Request('http://internal/api/x', { method: 'POST', headers });
  it.each([
    // [case, PUBLIC_URL, request headers, same origin?]
    ['the public origin', 'https://plateau.example', { host: 'plateau.example', origin: 'https://plateau.example' }, true],
    ['the public origin, whatever Host the proxy sends', 'https://plateau.example', { host: '10.0.0.7:4321', origin: 'https://plateau.example' }, true],
    ['a foreign origin', 'https://plateau.example', { host: 'plateau.example', origin: 'https://evil.example' }, false],
    [
      'a foreign origin matching a forged X-Forwarded-Host',
      'https://plateau.example',
      { host: 'plateau.example', 'x-forwarded-host': 'evil.example', origin: 'https://evil.example' },
      false,
    ],
    ['plain http to an https site', 'https://plateau.example', { host: 'plateau.example', origin: 'http://plateau.example' }, false],
    [
      'DNS rebinding: Host and Origin agree on a foreign name',
      'http://127.0.0.1:4321',
      { host: 'rebind.example:4321', origin: 'http://rebind.example:4321' },
      false,
    ],
    ['the same host name on another port (a dev server)', 'http://127.0.0.1:4321', { host: '127.0.0.1:4500', origin: 'http://127.0.0.1:4500' }, true],
    ['the same host name, but Origin names a third port', 'http://127.0.0.1:4321', { host: '127.0.0.1:4500', origin: 'http://127.0.0.1:9999' }, false],
    ['loopback spelled localhost', 'http://127.0.0.1:4321', { host: 'localhost:4321', origin: 'http://localhost:4321' }, true],
    ['localhost is not an alias of a public name', 'https://plateau.example', { host: 'localhost', origin: 'https://localhost' }, false],
    ['a Referer when there is no Origin', 'https://plateau.example', { host: 'plateau.example', referer: 'https://plateau.example/board?x=1' }, true],
    ['Origin null', 'https://plateau.example', { host: 'plateau.example', origin: 'null' }, false],
    ['neither Origin nor Referer', 'https://plateau.example', { host: 'plateau.example' }, false],
    ['a Host with credentials smuggled in', 'http://127.0.0.1:4321', { host: 'evil.example@127.0.0.1:4321', origin: 'http://evil.example' }, false],
  ])('%s', (_case, publicUrl, headers, expected) => {
    expect(isSameOrigin(request(headers), publicUrl)).toBe(expected);
  });

  it('always offers the public origin first', () => {
    expect(expectedOrigins(request({ host: '127.0.0.1:4500' }), 'http://127.0.0.1:4321')).toEqual(['http://127.0.0.1:4321', 'http://127.0.0.1:4500']);
  });
});

describe('cookiesMustBeSecure', () => {
  it.each([
    ['https://plateau.example', true],
    ['https://plateau.example:8443/', true],
    ['http://127.0.0.1:4321', false],
    ['HTTPS://PLATEAU.EXAMPLE', true],
  ])('PUBLIC_URL=%s -> %s', (publicUrl, expected) => {
    expect(cookiesMustBeSecure(publicUrl)).toBe(expected);
  });

  it('refuses a PUBLIC_URL that is not http(s)', () => {
    expect(() => cookiesMustBeSecure('ftp://plateau.example')).toThrow(/http or https/);
  });
});
