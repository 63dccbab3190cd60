export { safeNextPath, PAGE_ROOTS, DEFAULT_NEXT } from './next-path';
export { secretLinksIn, redactSecretLinks, LINK_REMOVED } from './secret-links';
