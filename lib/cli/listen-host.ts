/** The loopback address a local-mode install listens on. */
export const LOOPBACK_HOST = "127.0.0.1";

/**
 * Which address `npm start` serves on. LAPSEBANK_HOST always wins. Otherwise an install with no
 * accounts ("local" mode: whoever reaches it may change everything) listens on loopback only, so
 * nobody else on the school network can; once accounts exist it keeps the older HOST variable or
 * listens on every interface. `undefined` means every interface.
 */
export function chooseListenHost(input: { lapsebankHost: string | undefined; host: string | undefined; accountsExist: boolean }): { host: string | undefined; why: string } {
  const explicit = input.lapsebankHost?.trim();
  if (explicit) return { host: explicit, why: "LAPSEBANK_HOST" };
  if (!input.accountsExist) return { host: LOOPBACK_HOST, why: "local mode, no accounts yet: this machine only; LAPSEBANK_HOST serves other computers" };
  const legacy = input.host?.trim();
  return legacy ? { host: legacy, why: "HOST" } : { host: undefined, why: "accounts exist: every network interface" };
}
