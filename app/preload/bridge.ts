/**
 * The object the preload script exposes as `window.shadowfront`: one function per API channel, each
 * `group.method(arg) => invoke(IPC_PREFIX + "group.method", arg)`. Nothing else. Pure (no Electron
 * import), so it can be tested with a stand-in for ipcRenderer.invoke.
 */
import { API_CHANNELS, IPC_PREFIX, type ShadowfrontApi } from '../shared/contract.ts';

export type Invoke = (channel: string, arg: unknown) => Promise<unknown>;

export function buildBridge(invoke: Invoke): ShadowfrontApi {
  const api: Record<string, Record<string, (arg?: unknown) => Promise<unknown>>> = {};
  for (const channel of API_CHANNELS) {
    const [group, method] = channel.split('.') as [string, string];
    const ipcChannel = IPC_PREFIX + channel;
    (api[group] ??= {})[method] = (arg?: unknown) => invoke(ipcChannel, arg);
  }
  for (const g of Object.values(api)) Object.freeze(g);
  return Object.freeze(api) as unknown as ShadowfrontApi;
}
