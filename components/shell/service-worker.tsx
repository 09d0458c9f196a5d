"use client";
// Registers public/sw.js (the shell cache, the honest offline page and push notifications).
// Rendered once in the signed-in layout; does nothing where service workers are unavailable.
import { useEffect } from "react";

export function ServiceWorkerRegistration() {
  useEffect(() => {
    if (!("serviceWorker" in navigator)) return;
    navigator.serviceWorker.register("/sw.js", { scope: "/" }).catch((err: unknown) => {
      console.warn("service worker not registered", err);
    });
  }, []);
  return null;
}
