/** The part of `cookie` 0.7 (no types of its own) the server uses: see server/http/cookies.ts. */
declare module 'cookie' {
  /** The pairs of a Cookie header, each value URI-decoded where it decodes; the first of a repeated name wins. */
  export function parse(header: string): Record<string, string | undefined>;
}
