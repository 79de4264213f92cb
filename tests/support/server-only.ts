// In tests the "server-only" guard is a no-op: the guard matters only inside the Next.js bundle.
export {};
