// Stillfield's service worker, written by hand: @serwist/next plugs into webpack, and Next 16
// builds with Turbopack here; what the shell needs is small enough to keep readable. It owns three things:
// 1. The shell: Next's hashed static files, the icons and the offline page are cached, so the
//    app opens fast and an unreachable server shows an honest "Offline" page.
// 2. Never stale values as live: pages and /api/ requests always go to the network; a page is
//    never answered from the cache. Without a network a navigation gets the offline page, which
//    shows no values at all; data requests simply fail, and the pages say they are not live.
// 3. Push: shows the notification the server sent and opens its link when tapped.
const SHELL = "stillfield-shell-v1";
const PRECACHE = ["/offline.html", "/icons/icon-192.png", "/icons/badge-72.png", "/manifest.webmanifest"];

self.addEventListener("install", (event) => {
  event.waitUntil(caches.open(SHELL).then((c) => c.addAll(PRECACHE)).then(() => self.skipWaiting()));
});

self.addEventListener("activate", (event) => {
  event.waitUntil(
    caches
      .keys()
      .then((keys) => Promise.all(keys.filter((k) => k !== SHELL).map((k) => caches.delete(k))))
      .then(() => self.clients.claim()),
  );
});

function isShellAsset(url) {
  return url.origin === self.location.origin && (url.pathname.startsWith("/_next/static/") || url.pathname.startsWith("/icons/"));
}

self.addEventListener("fetch", (event) => {
  const req = event.request;
  if (req.method !== "GET") return;
  const url = new URL(req.url);
  if (url.origin !== self.location.origin) return;
  if (req.mode === "navigate") {
    event.respondWith(fetch(req).catch(() => caches.match("/offline.html")));
    return;
  }
  if (isShellAsset(url)) {
    // hashed file names never change content: cache first, fill on first use
    event.respondWith(
      caches.match(req).then(
        (hit) =>
          hit ||
          fetch(req).then((res) => {
            if (res.ok) {
              const copy = res.clone();
              void caches.open(SHELL).then((c) => c.put(req, copy));
            }
            return res;
          }),
      ),
    );
  }
  // everything else (/api/, live streams, pages' data): network only, never from a cache
});

self.addEventListener("push", (event) => {
  let data = { title: "Stillfield", body: "", url: "/alerts", tag: undefined };
  try {
    data = { ...data, ...event.data.json() };
  } catch {
    if (event.data) data.body = event.data.text();
  }
  event.waitUntil(
    self.registration.showNotification(data.title, {
      body: data.body,
      tag: data.tag,
      icon: "/icons/icon-192.png",
      badge: "/icons/badge-72.png",
      data: { url: data.url },
    }),
  );
});

self.addEventListener("notificationclick", (event) => {
  event.notification.close();
  const target = new URL((event.notification.data && event.notification.data.url) || "/alerts", self.location.origin);
  if (target.origin !== self.location.origin) return;
  event.waitUntil(self.clients.openWindow(target.href));
});
