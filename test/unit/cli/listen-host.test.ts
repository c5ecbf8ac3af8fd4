import { describe, expect, test } from "vitest";
import { chooseListenHost } from "../../../lib/cli/listen-host.ts";

describe("the address npm start listens on", () => {
  test.each([
    [{ lapsebankHost: undefined, host: undefined, accountsExist: false }, "127.0.0.1"],
    [{ lapsebankHost: undefined, host: "0.0.0.0", accountsExist: false }, "127.0.0.1"],
    [{ lapsebankHost: "0.0.0.0", host: undefined, accountsExist: false }, "0.0.0.0"],
    [{ lapsebankHost: " ", host: undefined, accountsExist: false }, "127.0.0.1"],
    [{ lapsebankHost: undefined, host: undefined, accountsExist: true }, undefined],
    [{ lapsebankHost: undefined, host: "10.0.0.5", accountsExist: true }, "10.0.0.5"],
    [{ lapsebankHost: "127.0.0.1", host: "10.0.0.5", accountsExist: true }, "127.0.0.1"],
  ])("%o → %s", (input, expected) => {
    expect(chooseListenHost(input).host).toBe(expected);
  });
});
