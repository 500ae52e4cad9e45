/**
 * The IPC side of the desktop app: one `ipcMain.handle` per API channel (IPC_PREFIX + channel). Each call
 * is checked first: it must come from our own window's main frame, showing our own page, and its argument
 * must have the channel's shape (./validate.ts). Refusals are ApiProblems of kind "invalid-request"; the
 * handlers never throw. No Electron import here (the main process passes ipcMain in), so tests can use a
 * stand-in.
 */
import { API_CHANNELS, IPC_PREFIX, type ApiChannel, type ApiReply, type ShadowfrontApi } from '../shared/contract.ts';
import { callChannel, invalidRequestReply } from './dispatch.ts';

/** The parts of an IpcMainInvokeEvent that the checks read. */
export interface SenderEvent {
  sender: { id: number; mainFrame?: unknown };
  senderFrame?: { url: string } | null;
}

export interface IpcMainLike {
  handle(channel: string, listener: (event: SenderEvent, ...args: unknown[]) => Promise<unknown>): void;
  removeHandler?(channel: string): void;
}

/** Who may call: our window's web contents, its main frame, on our page. */
export interface TrustedSender {
  webContentsId: () => number | null;
  /** The page's address (file URL of out/renderer/index.html); query and hash are ignored. */
  pageUrl: string;
}

function withoutHashAndQuery(url: string): string {
  const i = url.search(/[?#]/);
  return i < 0 ? url : url.slice(0, i);
}

export function isTrustedSender(event: SenderEvent, trusted: TrustedSender): boolean {
  const id = trusted.webContentsId();
  if (id === null || !event?.sender || event.sender.id !== id) return false;
  const frame = event.senderFrame;
  if (!frame || typeof frame.url !== 'string') return false;
  if (event.sender.mainFrame !== undefined && frame !== event.sender.mainFrame) return false;
  return withoutHashAndQuery(frame.url) === withoutHashAndQuery(trusted.pageUrl);
}

export type ReplyTransform = (reply: ApiReply<unknown>, arg: unknown) => Promise<ApiReply<unknown>>;

export function registerApiHandlers(
  ipc: IpcMainLike,
  service: ShadowfrontApi,
  trusted: TrustedSender,
  options: { transforms?: Partial<Record<ApiChannel, ReplyTransform>>; log?: (err: unknown) => void } = {},
): string[] {
  const registered: string[] = [];
  for (const channel of API_CHANNELS) {
    const name = IPC_PREFIX + channel;
    ipc.handle(name, async (event, ...args) => {
      if (!isTrustedSender(event, trusted)) return invalidRequestReply(channel, 'it did not come from the Shadowfront window');
      if (args.length > 1) return invalidRequestReply(channel, 'a call takes one argument');
      try {
        let reply = await callChannel(service, channel, args[0]);
        const transform = options.transforms?.[channel];
        if (transform && reply.ok) reply = await transform(reply, args[0]);
        return reply;
      } catch (err) {
        options.log?.(err);
        return { ok: false, problem: { kind: 'internal', message: 'Something went wrong inside Shadowfront. Nothing already saved was changed. Please report this.' } };
      }
    });
    registered.push(name);
  }
  return registered;
}
