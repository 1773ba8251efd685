import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, test } from 'vitest';
import { offlineFiles, serviceWorkerWrite } from '../../scripts/offline/offlinePlugin.mjs';
import { serviceWorkerSource } from '../../scripts/offline/serviceWorkerSource.mjs';

/** Runs the service worker's text against stand-ins for its global scope, caches and network. */
function swRun(source: string, network: (url: string) => Response | Promise<Response>) {
  const listeners: Record<string, (e: unknown) => void> = {};
  const stores = new Map<string, Map<string, Response>>();
  const fetched: string[] = [];
  const origin = 'http://app.test';
  const abs = (r: Request | string) => new URL(typeof r === 'string' ? r : r.url, `${origin}/`).href;
  const caches = {
    async open(name: string) {
      if (!stores.has(name)) stores.set(name, new Map());
      const m = stores.get(name)!;
      return {
        async addAll(reqs: Request[]) {
          for (const r of reqs) m.set(abs(r), await fetchFn(r));
        },
        async put(r: Request, res: Response) {
          m.set(abs(r), res);
        },
      };
    },
    async keys() {
      return [...stores.keys()];
    },
    async delete(name: string) {
      return stores.delete(name);
    },
    async match(r: Request | string, opts?: { cacheName?: string; ignoreSearch?: boolean }) {
      let key = abs(r);
      if (opts?.ignoreSearch) key = key.split('?')[0];
      for (const [name, m] of stores) if (!opts?.cacheName || opts.cacheName === name) if (m.has(key)) return m.get(key)!.clone();
      return undefined;
    },
  };
  const fetchFn = async (r: Request | string) => {
    fetched.push(abs(r));
    return network(abs(r));
  };
  const self = {
    location: { origin },
    addEventListener: (type: string, f: (e: unknown) => void) => (listeners[type] = f),
    skipWaiting: async () => undefined,
    clients: { claim: async () => undefined },
  };
  const RequestIn = class extends Request {
    constructor(input: string, init?: RequestInit) {
      super(new URL(input, `${origin}/`).href, init);
    }
  };
  new Function('self', 'caches', 'fetch', 'Request', source)(self, caches, fetchFn, RequestIn);
  const lifecycle = async (type: string) => {
    let done: Promise<unknown> = Promise.resolve();
    listeners[type]({ waitUntil: (p: Promise<unknown>) => (done = p) });
    await done;
  };
  const request = async (url: string, init: { method?: string; navigate?: boolean } = {}) => {
    let answered: Promise<Response> | null = null;
    const req = { url: new URL(url, `${origin}/`).href, method: init.method ?? 'GET', mode: init.navigate ? 'navigate' : 'cors' };
    listeners.fetch({ request: req, respondWith: (p: Promise<Response>) => (answered = p) });
    return answered as Promise<Response> | null;
  };
  return { lifecycle, request, stores, fetched };
}

const page = (body: string) => new Response(body, { status: 200, headers: { 'Cross-Origin-Opener-Policy': 'same-origin', 'Cross-Origin-Embedder-Policy': 'require-corp' } });

describe('serviceWorkerSource(version, files)', () => {
  test('install caches the page and every file; offline, the page and files come from the cache with their headers', async () => {
    let online = true;
    const sw = swRun(serviceWorkerSource('v1', ['assets/index-1.js', 'assets/compute.worker-2.js', 'assets/hdf5_hl-3.js']), (url) => {
      if (!online) throw new TypeError('Failed to fetch');
      return page(`body of ${new URL(url).pathname}`);
    });
    await sw.lifecycle('install');
    await sw.lifecycle('activate');
    const cached = [...sw.stores.get('torusgrav-v1')!.keys()].map((u) => new URL(u).pathname).sort();
    expect(cached).toEqual(['/', '/assets/compute.worker-2.js', '/assets/hdf5_hl-3.js', '/assets/index-1.js']);
    online = false;
    const nav = await sw.request('/?n=1000&fresh', { navigate: true });
    expect(await nav!.text()).toBe('body of /');
    expect(nav!.headers.get('Cross-Origin-Embedder-Policy')).toBe('require-corp');
    expect(nav!.headers.get('Cross-Origin-Opener-Policy')).toBe('same-origin');
    expect(await (await sw.request('/assets/hdf5_hl-3.js'))!.text()).toBe('body of /assets/hdf5_hl-3.js');
  });

  test('online, the page comes from the network (a new build is seen); files come from the cache without a request', async () => {
    let build = 'old';
    const sw = swRun(serviceWorkerSource('v1', ['assets/a.js']), (url) => page(`${build} ${new URL(url).pathname}`));
    await sw.lifecycle('install');
    build = 'new';
    const before = sw.fetched.length;
    expect(await (await sw.request('/', { navigate: true }))!.text()).toBe('new /');
    expect(await (await sw.request('/assets/a.js'))!.text()).toBe('old /assets/a.js');
    expect(sw.fetched.length).toBe(before + 1);
  });

  test('other origins and non-GET requests are left to the browser; activate deletes older torusgrav caches only', async () => {
    const sw = swRun(serviceWorkerSource('v2', []), () => page('x'));
    await sw.lifecycle('install');
    expect(await sw.request('http://elsewhere.test/x.js')).toBeNull();
    expect(await sw.request('/api', { method: 'POST' })).toBeNull();
    sw.stores.set('torusgrav-v1', new Map());
    sw.stores.set('someone-else', new Map());
    await sw.lifecycle('activate');
    expect([...sw.stores.keys()].sort()).toEqual(['someone-else', 'torusgrav-v2']);
  });
});

describe('offlineFiles(outDir) / serviceWorkerWrite(outDir)', () => {
  const dirs: string[] = [];
  afterEach(() => {
    for (const d of dirs.splice(0)) rmSync(d, { recursive: true, force: true });
  });

  test('lists every built file but the page, sw.js and source maps; the cache name follows the contents', () => {
    const dir = mkdtempSync(join(tmpdir(), 'sw-'));
    dirs.push(dir);
    mkdirSync(join(dir, 'assets'));
    for (const [f, t] of [['index.html', '<p>'], ['assets/b.js', 'b'], ['assets/a.worker-1.js', 'a'], ['assets/a.js.map', '{}'], ['sw.js', 'old'], ['icon.svg', '<svg/>']]) writeFileSync(join(dir, f), t);
    expect(offlineFiles(dir)).toEqual(['assets/a.worker-1.js', 'assets/b.js', 'icon.svg']);
    const v1 = serviceWorkerWrite(dir);
    const text = readFileSync(join(dir, 'sw.js'), 'utf8');
    expect(text).toContain(`"torusgrav-${v1}"`);
    expect(text).toContain('["./","./assets/a.worker-1.js","./assets/b.js","./icon.svg"]');
    expect(serviceWorkerWrite(dir)).toBe(v1);
    writeFileSync(join(dir, 'assets/b.js'), 'b2');
    expect(serviceWorkerWrite(dir)).not.toBe(v1);
  });
});
