/**
 * The component tests' way to wait: polls `check` until it returns something other than
 * `undefined`, `null` or `false`, and returns that; fails after `timeoutMs` naming `what`. For a
 * request a screen makes only after an earlier answer has settled (a resource that depends on
 * another, a click's change detection), where `fixture.whenStable()` would wait on that very request.
 * The one polling wait of all tests: `spec/support/wait.ts` calls it with longer defaults (it lives
 * here, not there, because the client type-check must not reach the server's test support).
 */
export async function waitFor<T>(
  what: string,
  check: () => Promise<T | undefined | null | false> | T | undefined | null | false,
  { timeoutMs = 5_000, everyMs = 5 }: { timeoutMs?: number; everyMs?: number } = {},
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await check();
    if (value !== undefined && value !== null && value !== false) return value;
    if (Date.now() > deadline) throw new Error(`waited ${timeoutMs} ms for ${what}`);
    await new Promise((resolve) => setTimeout(resolve, everyMs));
  }
}
