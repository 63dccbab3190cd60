export { parseTrustProxy, clientAddressFrom, normaliseAddress, forwardedHops, TrustProxyError, LOOPBACK_ENTRIES, type TrustedProxies } from './trusted-proxies';
