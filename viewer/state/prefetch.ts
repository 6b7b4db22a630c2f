// Responses the page's first inline script started fetching before the viewer's code loaded
// (see index.html). Each is handed out once; anything not prefetched is fetched normally.

declare global {
  interface Window {
    __axonloomPrefetch?: Record<string, Promise<Response>>;
  }
}

export const prefetchingFetch: typeof fetch = (input, init) => {
  const key = typeof input === 'string' ? input : input instanceof URL ? input.href : input.url;
  const cache = window.__axonloomPrefetch;
  const hit = cache?.[key];
  if (hit && !init) {
    delete cache![key];
    return hit;
  }
  return fetch(input, init);
};
