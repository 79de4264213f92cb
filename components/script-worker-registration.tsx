"use client";

import { useEffect } from "react";

/**
 * Installs the script worker (lib/web/script-worker.ts) once the page has loaded, in production
 * builds only: in development the scripts change with every edit. Without it (a browser without
 * service workers, or a refusal) the scripts simply load from the network.
 */
export function ScriptWorkerRegistration() {
  useEffect(() => {
    if (process.env.NODE_ENV !== "production" || !("serviceWorker" in navigator)) return;
    const register = () => void navigator.serviceWorker.register("/sw.js", { scope: "/" }).catch(() => {});
    if (document.readyState === "complete") {
      register();
      return;
    }
    window.addEventListener("load", register, { once: true });
    return () => window.removeEventListener("load", register);
  }, []);
  return null;
}
